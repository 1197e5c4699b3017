package main

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestScenariosChecksAsSimulateDoes: a file simulate refuses is refused by
// 'scenarios FILE' with the same message; with --model, the model-dependent
// refusals of simulate too.
func TestScenariosChecksAsSimulateDoes(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	dir := t.TempDir()
	file := func(name, src string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	explosive := file("explosive.toml", "name = \"explosive\"\n[persistence]\nphi = [1.2]\n")
	doubled := file("doubled.toml", "name = \"doubled\"\n[persistence]\nscale = 2\n") // fitted φ₁ ≈ 0.7: 1.4
	same := file("same.toml", "name = \"explosive\"\n[shift]\nuniform = 1\n")
	ctx := context.Background()
	sim := func(args ...string) []string {
		return append([]string{"simulate", "--model", m, "--paths", "10"}, args...)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"scenarios", explosive}, explosive + ":3: key persistence.phi: φ = 1.2 is not stationary"},
		{sim("--scenario", explosive), explosive + ":3: key persistence.phi: φ = 1.2 is not stationary"},
		{[]string{"scenarios", "--model", m, doubled}, "doubled.toml: scenario doubled: key persistence: φ = 1."},
		{sim("--scenario", doubled), "doubled.toml: scenario doubled: key persistence: φ = 1."},
		{[]string{"scenarios", "warm-1c", doubled, "warm-1c"}, "built-in scenario \"warm-1c\" given twice"},
		{sim("--scenario", doubled, "--scenario", doubled), doubled + ":1: key name: \"doubled\" is also the name of the scenario in " + doubled + ":1"},
	} {
		code, _, stderr := call(t, ctx, c.args...)
		if code != 1 || !strings.Contains(stderr, c.want) {
			t.Errorf("%v: exit %d, stderr %q; want 1 and %q", c.args[:2], code, stderr, c.want)
		}
	}
	// Without a model, a scale can only be checked for its range.
	if code, out, stderr := call(t, ctx, "scenarios", doubled, "warm-1c"); code != 0 || !strings.Contains(out, "persistence φ × 2.00") {
		t.Errorf("scenarios without --model: exit %d\n%s%s", code, out, stderr)
	}
	// A file sharing a name with another is fine alone.
	if code, _, stderr := call(t, ctx, "scenarios", "--model", m, "--year", "2030", same); code != 0 {
		t.Errorf("scenarios --model: exit %d: %s", code, stderr)
	}
	if code, _, _ := call(t, ctx, "scenarios", "--year", "2030", same); code != 2 {
		t.Errorf("--year without --model: exit %d, want 2", code)
	}
}
