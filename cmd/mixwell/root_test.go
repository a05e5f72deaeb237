package main

import (
	"errors"
	"strings"
	"testing"
	"time"
)

func TestVersion(t *testing.T) {
	stdout, _, err := execute(t, (&fakeLib{}).deps(), "--version")
	if err != nil {
		t.Fatalf("--version: %v", err)
	}
	if !strings.HasPrefix(stdout, "mixwell ") {
		t.Errorf("--version printed %q, want it to start with %q", stdout, "mixwell ")
	}
}

func TestRootHelpNamesTheJob(t *testing.T) {
	stdout, _, err := execute(t, (&fakeLib{}).deps(), "--help")
	if err != nil {
		t.Fatalf("--help: %v", err)
	}
	for _, want := range []string{"Onsager–Stefan–Maxwell", "verify"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("root help lacks %q:\n%s", want, stdout)
		}
	}
}

func TestVerifyHelpExplainsDegree(t *testing.T) {
	stdout, _, err := execute(t, (&fakeLib{}).deps(), "verify", "--help")
	if err != nil {
		t.Fatalf("verify --help: %v", err)
	}
	for _, want := range []string{"pressure or potential space", "Lagrange degree", "poisson", "rt: degrees 0, 1, 2, 3, 4"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("verify help lacks %q:\n%s", want, stdout)
		}
	}
}

func TestOneLine(t *testing.T) {
	inner := errors.New("a\n  b\tc")
	err := oneLine(inner)
	if got, want := err.Error(), "a b c"; got != want {
		t.Errorf("oneLine(%q) = %q, want %q", inner, got, want)
	}
	if !errors.Is(err, inner) {
		t.Errorf("oneLine does not wrap its argument")
	}
	plain := errors.New("plain")
	if oneLine(plain) != plain {
		t.Errorf("oneLine changed an error that is already one line")
	}
}

func TestProgressLine(t *testing.T) {
	for _, tc := range []struct {
		level, levels, unknowns int
		took                    time.Duration
		want                    string
	}{
		// Work shares 1/85, 5/85, 21/85, 85/85 of 20 characters.
		{0, 4, 289, 1234 * time.Millisecond, "[....................] level 1/4 solved (289 unknowns, 1.2 s)"},
		{1, 4, 1089, 2 * time.Second, "[#...................] level 2/4 solved (1089 unknowns, 2.0 s)"},
		{2, 4, 4225, 8 * time.Second, "[#####...............] level 3/4 solved (4225 unknowns, 8.0 s)"},
		{3, 4, 61234, 65 * time.Second, "[####################] level 4/4 solved (61234 unknowns, 65.0 s)"},
	} {
		if got := progressLine(tc.level, tc.levels, tc.unknowns, tc.took); got != tc.want {
			t.Errorf("progressLine(%d, %d, %d, %v) = %q, want %q", tc.level, tc.levels, tc.unknowns, tc.took, got, tc.want)
		}
	}
}
