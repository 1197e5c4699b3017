// Package outputs guards and commits the files a run writes.
//
// Check refuses an output path before any work is done: one that is an
// input of the same run (the same file by os.SameFile, or the same cleaned
// absolute path when it does not exist yet), a symbolic link, an existing
// directory, device, FIFO or other non-regular file, or an existing file
// when the user did not ask to replace it. Every refusal wraps ErrRefused,
// which the command line maps to exit status 1.
//
// A Set writes several output files as one: Add writes each file into a
// staging directory created beside its target (so on the same file system,
// where a rename is atomic), and Commit moves them all into place only when
// every one was written. Files being replaced are kept as backups until
// every rename has succeeded; if one fails, the files already moved are put
// back (or removed when they are new), so a failed run leaves the previous
// outputs as they were. Abort removes the staging directories and changes
// nothing else. Outputs may lie in one directory or several.
//
// Each Set carries a run id, "YYYYMMDDThhmmssZ-" followed by 8 random hex
// digits, which the caller records in its manifest and which names the
// staging directories (".wxstress-<run id>-…"), so a leftover from a killed
// process can be traced to its run.
//
// A Set is not safe for concurrent use.
package outputs
