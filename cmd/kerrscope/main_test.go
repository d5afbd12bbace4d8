package main

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"
)

func runCLI(args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

func TestProbeJSONKeys(t *testing.T) {
	code, out, _ := runCLI("probe", "--spin", "0.9", "--inclination", "60", "--alpha", "-3.1", "--beta", "4.2", "--json")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	if strings.Count(strings.TrimSpace(out), "\n") != 0 {
		t.Fatalf("want exactly one JSON line, got %q", out)
	}
	var m map[string]any
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"spin", "inclination_deg", "alpha", "beta", "lambda", "eta", "fate", "crossings"} {
		if _, ok := m[k]; !ok {
			t.Errorf("missing key %q", k)
		}
	}
	if f := m["fate"]; f != "horizon" && f != "infinity" {
		t.Errorf("fate %v", f)
	}
	cs := m["crossings"].([]any)
	if len(cs) == 0 {
		t.Fatal("no crossings")
	}
	for _, k := range []string{"order", "r", "mino_time", "outbound"} {
		if _, ok := cs[0].(map[string]any)[k]; !ok {
			t.Errorf("crossing lacks %q", k)
		}
	}
	// λ = -α sin θo (Bardeen 1973).
	if l := m["lambda"].(float64); l < 2.6846 || l > 2.6847 {
		t.Errorf("lambda %v", l)
	}
}

func TestProbeRejects(t *testing.T) {
	cases := []struct {
		args []string
		flag string
	}{
		{[]string{"--spin", "1", "--alpha", "1", "--beta", "1"}, "--spin"},
		{[]string{"--spin", "-1.5", "--alpha", "1", "--beta", "1"}, "--spin"},
		{[]string{"--inclination", "181", "--alpha", "1", "--beta", "1"}, "--inclination"},
		{[]string{"--inclination", "-0.1", "--alpha", "1", "--beta", "1"}, "--inclination"},
		{[]string{"--alpha", "NaN", "--beta", "1"}, "--alpha"},
		{[]string{"--alpha", "x", "--beta", "1"}, "--alpha"},
		{[]string{"--alpha", "1", "--beta", "Inf"}, "--beta"},
		{[]string{"--alpha", "1", "--beta", "1", "--orders", "0"}, "--orders"},
		{[]string{"--alpha", "1", "--beta", "1", "--orders", "two"}, "--orders"},
		{[]string{"--beta", "1"}, "--alpha"},
	}
	for _, c := range cases {
		code, out, errs := runCLI(append([]string{"probe"}, c.args...)...)
		if code != 2 || out != "" || strings.Count(errs, "\n") != 1 || !strings.Contains(errs, c.flag) {
			t.Errorf("%v: exit %d, stdout %q, stderr %q", c.args, code, out, errs)
		}
	}
}

func TestProbeText(t *testing.T) {
	code, out, _ := runCLI("probe", "--alpha", "0", "--beta", "0", "--spin", "0", "--inclination", "0")
	if code != 0 || !strings.Contains(out, "horizon") {
		t.Errorf("exit %d: %s", code, out)
	}
}
