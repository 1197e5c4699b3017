package main

import (
	"bytes"
	"os"
	"testing"
)

// TestGeneratedFileIsCurrent checks that statespace/filter_gen.go is what
// this generator writes now: run go generate in statespace after changing
// either.
func TestGeneratedFileIsCurrent(t *testing.T) {
	want, err := generate()
	if err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile("../../filter_gen.go")
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		t.Error("statespace/filter_gen.go differs from the generator's output: run go generate ./statespace")
	}
}
