package sweep

import (
	"math"
	"strings"
	"testing"
)

// Bookkeeping: the values of every spacing.
func TestSpacing(t *testing.T) {
	cases := []struct {
		spec     string
		from, to float64
		n        int
	}{
		{"spin=0.5:0.999999:60:log1m", 0.5, 0.999999, 60},
		{"spin=0.9:0.999999:7:log1m", 0.9, 0.999999, 7},
		{"spin=0.999999999:-0.5:9:log1m", 0.999999999, -0.5, 9},
		{"spin=0.5:0.9999999999999:2000:log1m", 0.5, 0.9999999999999, 2000},
		{"inclination=20:80:4", 20, 80, 4},
		{"observer.inclination_deg=80:20:13:linear", 80, 20, 13},
		{"index=1.5:6:11:log", 1.5, 6, 11},
		{"line=0.1:100:5:log", 0.1, 100, 5},
		{"spin=-0.3:0.3:3", -0.3, 0.3, 3},
		{"spin=0.7:0.7:1", 0.7, 0.7, 1},
		{"field-radial=0:1:5", 0, 1, 5},
		{"polarisation.field_vertical=-1:1:3", -1, 1, 3},
		{"pol-fraction=0.1:0.7:4", 0.1, 0.7, 4},
	}
	for _, c := range cases {
		a, err := ParseAxis(c.spec)
		if err != nil {
			t.Fatalf("%s: %v", c.spec, err)
		}
		v, err := a.Values()
		if err != nil {
			t.Fatalf("%s: %v", c.spec, err)
		}
		if len(v) != c.n || v[0] != c.from || v[len(v)-1] != c.to {
			t.Errorf("%s: %d values from %v to %v", c.spec, len(v), v[0], v[len(v)-1])
		}
		for k := 1; k < len(v); k++ {
			if (c.to > c.from && !(v[k] > v[k-1])) || (c.to < c.from && !(v[k] < v[k-1])) {
				t.Errorf("%s: not strictly monotonic at %d: %v, %v", c.spec, k, v[k-1], v[k])
			}
		}
		if a.Spacing == Log1m {
			for k, x := range v {
				if !(x < 1) {
					t.Errorf("%s: value %d = %v is not below 1", c.spec, k, x)
				}
			}
		}
		// Equal steps in the spacing's own coordinate.
		if c.n > 2 {
			for k, x := range v {
				want := float64(k) / float64(c.n-1)
				if a.Spacing == Log1m && 1-x < 1e-10 {
					continue // 1 − v keeps too few digits there to place it finely
				}
				if p := a.Position(x); math.Abs(p-want) > 1e-5 { // 1 − v near 1 keeps few digits
					t.Errorf("%s: value %d at position %v, want %v", c.spec, k, p, want)
					break
				}
			}
		}
	}
	// log1m: 1 − a is log-spaced, 0.9 → 0.999999 in 6 steps is 1 − 10^−k.
	a, _ := ParseAxis("spin=0.9:0.999999:6:log1m")
	v, _ := a.Values()
	for k, x := range v {
		if want := 1 - math.Pow(10, -float64(k+1)); x != want {
			t.Errorf("log1m value %d = %v, want %v", k, x, want)
		}
	}
}

// Bookkeeping: malformed and out-of-range axes are refused with a reason.
func TestParseAxisRefuses(t *testing.T) {
	cases := []struct{ spec, want string }{
		{"spin", "KEY=FROM:TO:COUNT"},
		{"spin=0.5:0.9", "FROM:TO:COUNT"},
		{"spin=0.5:0.9:3:log:x", "FROM:TO:COUNT"},
		{"colour=1:2:3", "unknown scene value"},
		{"width=32:64:3", "does not take a real number"},
		{"orders=1:3:3", "does not take a real number"},
		{"emissivity=1:2:2", "does not take a real number"},
		{"transparent=0:1:2", "does not take a real number"},
		{"fov=10:20:3", "field of view"},
		{"emin=1:2:3", "energy range"},
		{"spin=a:0.9:3", "not a finite number"},
		{"spin=NaN:0.9:3", "not a finite number"},
		{"spin=0.1:Inf:3", "not a finite number"},
		{"spin=0.1:0.9:x", "whole number"},
		{"spin=0.1:0.9:0", "between 1 and"},
		{"spin=0.1:0.9:-4", "between 1 and"},
		{"spin=0.1:0.9:1000000", "between 1 and"},
		{"spin=0.1:0.9:3:cubic", "unknown spacing"},
		{"spin=0:0.9:3:log", "positive ends"},
		{"spin=-0.5:0.9:3:log", "positive ends"},
		{"spin=0.5:1:3:log1m", "below 1"},
		{"spin=1.5:0.9:3:log1m", "below 1"},
		{"spin=0.5:0.5:3", "count of 1"},
		{"spin=0.5:0.6:1", "a count of 1 needs"},
		{"spin=0.5:0.50000000000000001:3", "count of 1"},
		{"spin=0.5:0.5000000000000002:9", "too close"},
	}
	for _, c := range cases {
		a, err := ParseAxis(c.spec)
		if err == nil {
			_, err = a.Values()
		}
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %v, want an error with %q", c.spec, err, c.want)
		}
	}
	// Flag names and scene keys name the same value.
	a, err1 := ParseAxis("inclination=10:20:2")
	b, err2 := ParseAxis("observer.inclination_deg=10:20:2")
	if err1 != nil || err2 != nil || a != b || a.Key != "observer.inclination_deg" {
		t.Errorf("%+v %v, %+v %v", a, err1, b, err2)
	}
	if s := a.String(); s != "observer.inclination_deg=10:20:2:linear" {
		t.Errorf("String %q", s)
	}
}

// Bookkeeping: shard syntax and that shards partition the frames.
func TestShard(t *testing.T) {
	for _, bad := range []string{"", "3", "0/4", "5/4", "-1/4", "1/0", "a/b", "1/4/2", "1/1000000"} {
		if _, err := ParseShard(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
	const n, frames = 4, 23
	count := make([]int, frames)
	for k := 1; k <= n; k++ {
		s, err := ParseShard(" " + string(rune('0'+k)) + "/4 ")
		if err != nil {
			t.Fatal(err)
		}
		if s.ManifestName() != "sweep-shard-"+string(rune('0'+k))+"-of-4.json" {
			t.Errorf("manifest name %q", s.ManifestName())
		}
		for i := range count {
			if s.Owns(i) {
				count[i]++
			}
		}
	}
	for i, c := range count {
		if c != 1 {
			t.Errorf("frame %d owned by %d shards", i, c)
		}
	}
}

// Bookkeeping: two-sided rounding of the chosen scales.
func TestRoundSig(t *testing.T) {
	cases := []struct {
		x    float64
		up   bool
		want float64
	}{
		{1.2532, true, 1.3}, {1.3, true, 1.3}, {0.0052191, false, 0.0052}, {0.41, false, 0.41},
		{0.16191, true, 0.17}, {987, true, 990}, {999.1, true, 1000}, {12345, false, 12000},
	}
	for _, c := range cases {
		if got := roundSig(c.x, c.up); got != c.want {
			t.Errorf("roundSig(%v, %v) = %v, want %v", c.x, c.up, got, c.want)
		}
	}
}
