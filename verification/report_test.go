package verification

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// fakePowersName is a problem registered only while a report test runs. Its
// errors are exact powers of h, so its observed rates are known in closed
// form: u_L2 = 0.5 h^3 and u_H1 = 2 h^2 give rates 3 and 2 on every pair.
const fakePowersName = "fake-powers"

func registerFakePowers(t *testing.T) {
	t.Helper()
	if _, ok := registry[fakePowersName]; ok {
		t.Fatalf("problem %q already registered", fakePowersName)
	}
	register(&problem{
		name:    fakePowersName,
		degrees: func(string) []int { return []int{1} },
		run: func(cfg Config, progress func(level, unknowns int)) (*Study, error) {
			coarse := cfg.Coarse
			if coarse == 0 {
				coarse = 2
			}
			s := &Study{
				Problem:  fakePowersName,
				Degree:   cfg.Degree,
				Mesh:     "structured",
				Errors:   map[string][]float64{},
				Expected: map[string]float64{"u_L2": 3, "u_H1": 2},
			}
			for l := 0; l < cfg.Levels; l++ {
				n := coarse << l
				h := 1 / float64(n)
				s.H = append(s.H, h)
				s.Unknowns = append(s.Unknowns, (n+1)*(n+1))
				s.Errors["u_L2"] = append(s.Errors["u_L2"], 0.5*h*h*h)
				s.Errors["u_H1"] = append(s.Errors["u_H1"], 2*h*h)
				s.Residuals = append(s.Residuals, 1e-15)
				if progress != nil {
					progress(l, s.Unknowns[l])
				}
			}
			return s, nil
		},
	})
	// Leave the registry as it was, so that tests looping over
	// Problems never see the fake.
	t.Cleanup(func() { delete(registry, fakePowersName) })
}

func fakeStudy(t *testing.T, levels int) *Study {
	t.Helper()
	registerFakePowers(t)
	s, err := Run(Config{Problem: fakePowersName, Degree: 1, Levels: levels}, nil)
	if err != nil {
		t.Fatalf("Run(%s): %v", fakePowersName, err)
	}
	return s
}

func TestWriteTableShowsRates(t *testing.T) {
	const levels = 4
	s := fakeStudy(t, levels)
	var buf bytes.Buffer
	if err := WriteTable(&buf, s); err != nil {
		t.Fatalf("WriteTable: %v", err)
	}
	out := buf.String()
	lines := strings.Split(strings.TrimRight(out, "\n"), "\n")
	// Title, header, one row per level, expected row.
	if got, want := len(lines), 2+levels+1; got != want {
		t.Fatalf("table has %d lines, want %d:\n%s", got, want, out)
	}
	if !strings.HasPrefix(lines[0], "problem "+fakePowersName+", degree 1") {
		t.Errorf("title = %q, want it to name the problem and degree", lines[0])
	}
	for _, col := range []string{"level", "h", "unknowns", "u_H1 error", "u_L2 error", "rate", "residual"} {
		if !strings.Contains(lines[1], col) {
			t.Errorf("header %q lacks column %q", lines[1], col)
		}
	}
	// Rates are exact powers (see registerFakePowers): every level after
	// the first shows 2.00 for u_H1 and 3.00 for u_L2, as does the
	// expected row.
	for i, line := range lines[3:] {
		if !strings.Contains(line, "2.00") || !strings.Contains(line, "3.00") {
			t.Errorf("row %d = %q, want rates 2.00 and 3.00", i+1, line)
		}
	}
	if first := lines[2]; strings.Contains(first, "2.00") || !strings.Contains(first, "-") {
		t.Errorf("first level row = %q, want no rate (shown as -)", first)
	}
	if last := lines[len(lines)-1]; !strings.HasPrefix(strings.TrimSpace(last), "expected") {
		t.Errorf("last row = %q, want the expected rates", last)
	}
	// Columns line up: the header and every level row have the same width.
	for i, line := range lines[1 : 2+levels] {
		if len(line) != len(lines[1]) {
			t.Errorf("row %d has width %d, header has %d:\n%s", i, len(line), len(lines[1]), out)
		}
	}
}

func TestWriteJSONRoundTrip(t *testing.T) {
	s := fakeStudy(t, 3)
	s.Variant = "plain"
	var buf bytes.Buffer
	if err := WriteJSON(&buf, s); err != nil {
		t.Fatalf("WriteJSON: %v", err)
	}
	var raw map[string]json.RawMessage
	if err := json.Unmarshal(buf.Bytes(), &raw); err != nil {
		t.Fatalf("output is not a JSON object: %v\n%s", err, buf.String())
	}
	for _, key := range []string{"problem", "variant", "degree", "mesh", "h", "unknowns", "errors", "rates", "expected", "pair_rates", "residuals"} {
		if _, ok := raw[key]; !ok {
			t.Errorf("JSON lacks key %q", key)
		}
	}
	var got Study
	if err := json.Unmarshal(buf.Bytes(), &got); err != nil {
		t.Fatalf("decoding into Study: %v", err)
	}
	// encoding/json writes the shortest decimal that parses back to the
	// same float64, so the round trip is exact and DeepEqual is the right
	// comparison here.
	if !reflect.DeepEqual(&got, s) {
		t.Errorf("round trip changed the study:\ngot  %+v\nwant %+v", got, *s)
	}
	if !strings.HasSuffix(buf.String(), "}\n") {
		t.Errorf("JSON output does not end in a newline")
	}
}

func TestWriteJSONNonFinite(t *testing.T) {
	s := &Study{
		Problem:  "p",
		H:        []float64{0.5, 0.25},
		Unknowns: []int{9, 25},
		Errors:   map[string][]float64{"e": {1e-3, 0}},
		Rates:    map[string]float64{"e": math.Inf(1)},
		Expected: map[string]float64{"e": 2},
		PairRates: map[string][]float64{
			"e": {math.NaN()},
		},
	}
	var buf bytes.Buffer
	if err := WriteJSON(&buf, s); err != nil {
		t.Fatalf("WriteJSON with non-finite rates: %v", err)
	}
	var got struct {
		Rates     map[string]*float64   `json:"rates"`
		PairRates map[string][]*float64 `json:"pair_rates"`
	}
	if err := json.Unmarshal(buf.Bytes(), &got); err != nil {
		t.Fatalf("output is not valid JSON: %v\n%s", err, buf.String())
	}
	if got.Rates["e"] != nil || got.PairRates["e"][0] != nil {
		t.Errorf("non-finite values should be null:\n%s", buf.String())
	}
}

// TestStudyJSONMirrorsStudy checks that the JSON form WriteJSON uses has the
// same fields with the same keys as Study, so that a field added to Study is
// not silently left out of the output.
func TestStudyJSONMirrorsStudy(t *testing.T) {
	st, mt := reflect.TypeOf(Study{}), reflect.TypeOf(studyJSON{})
	if st.NumField() != mt.NumField() {
		t.Fatalf("Study has %d fields, studyJSON %d: update studyJSON in report.go", st.NumField(), mt.NumField())
	}
	for i := range st.NumField() {
		sf, mf := st.Field(i), mt.Field(i)
		if sf.Name != mf.Name || sf.Tag.Get("json") != mf.Tag.Get("json") {
			t.Errorf("field %d: Study has %s `json:%q`, studyJSON has %s `json:%q`",
				i, sf.Name, sf.Tag.Get("json"), mf.Name, mf.Tag.Get("json"))
		}
	}
}

func TestWritePlot(t *testing.T) {
	s := fakeStudy(t, 4)
	for _, tc := range []struct {
		name  string
		file  string
		check func(t *testing.T, b []byte)
	}{
		{"png", "conv.png", func(t *testing.T, b []byte) {
			if _, err := png.Decode(bytes.NewReader(b)); err != nil {
				t.Errorf("not a valid PNG: %v", err)
			}
		}},
		{"upper-case png", "CONV.PNG", func(t *testing.T, b []byte) {
			if _, err := png.Decode(bytes.NewReader(b)); err != nil {
				t.Errorf("not a valid PNG: %v", err)
			}
		}},
		{"svg", "conv.svg", func(t *testing.T, b []byte) {
			if !bytes.Contains(b, []byte("<svg")) {
				t.Errorf("SVG output lacks <svg")
			}
		}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			path := filepath.Join(dir, tc.file)
			if err := WritePlot(path, s); err != nil {
				t.Fatalf("WritePlot(%s): %v", tc.file, err)
			}
			b, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("reading plot: %v", err)
			}
			if len(b) == 0 {
				t.Fatalf("plot file %s is empty", tc.file)
			}
			tc.check(t, b)
			assertOnlyFiles(t, dir, tc.file)
		})
	}
}

func TestWritePlotDropsNonPositive(t *testing.T) {
	s := &Study{
		Problem: "p",
		Degree:  1,
		H:       []float64{0.5, 0.25, 0.125, 0.0625},
		Errors: map[string][]float64{
			"a": {1e-2, 0, 2.5e-3, -1},            // zero and negative dropped
			"b": {math.NaN(), 1e-4, 2.5e-5, 6e-6}, // NaN dropped
			"c": {0, 0, 0, 0},                     // nothing left: norm skipped
		},
		Rates:    map[string]float64{"a": math.Inf(-1), "b": 2, "c": math.NaN()},
		Expected: map[string]float64{"a": 2, "b": 2, "c": 2},
	}
	path := filepath.Join(t.TempDir(), "drop.png")
	if err := WritePlot(path, s); err != nil {
		t.Fatalf("WritePlot with non-positive errors: %v", err)
	}
	if fi, err := os.Stat(path); err != nil || fi.Size() == 0 {
		t.Fatalf("plot not written: %v", err)
	}

	none := &Study{Problem: "p", H: []float64{0.5, 0.25}, Errors: map[string][]float64{"a": {0, -1}}}
	path = filepath.Join(t.TempDir(), "none.svg")
	err := WritePlot(path, none)
	if err == nil || !strings.Contains(err.Error(), "nothing to plot") {
		t.Errorf("WritePlot with no positive error: err = %v, want one saying nothing to plot", err)
	}
	if _, statErr := os.Stat(path); !errors.Is(statErr, os.ErrNotExist) {
		t.Errorf("failed plot left a file at %s", path)
	}
}

func TestPlotFormat(t *testing.T) {
	for _, tc := range []struct {
		path, want string
		ok         bool
	}{
		{"a.png", "png", true},
		{"dir.x/a.SVG", "svg", true},
		{"a.pdf", "", false},
		{"a", "", false},
		{"png", "", false},
	} {
		got, err := PlotFormat(tc.path)
		if tc.ok != (err == nil) || got != tc.want {
			t.Errorf("PlotFormat(%q) = %q, %v; want %q, ok=%v", tc.path, got, err, tc.want, tc.ok)
		}
		if err != nil && !strings.Contains(err.Error(), ".png or .svg") {
			t.Errorf("PlotFormat(%q) error %q does not name the allowed extensions", tc.path, err)
		}
	}
	dir := t.TempDir()
	if err := WritePlot(filepath.Join(dir, "conv.pdf"), fakeStudy(t, 2)); err == nil {
		t.Errorf("WritePlot(conv.pdf) succeeded, want an error")
	}
	assertOnlyFiles(t, dir)
}

func assertOnlyFiles(t *testing.T, dir string, want ...string) {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, e := range entries {
		got = append(got, e.Name())
	}
	if fmt.Sprint(got) != fmt.Sprint(want) {
		t.Errorf("directory holds %v, want %v (no temporary files)", got, want)
	}
}

func ExampleWriteTable() {
	// Errors of a made-up study: 0.5 h^2 and 2 h, so rates 2 and 1.
	s := &Study{
		Problem:   "example",
		Degree:    1,
		Mesh:      "structured",
		H:         []float64{0.25, 0.125, 0.0625},
		Unknowns:  []int{25, 81, 289},
		Errors:    map[string][]float64{"L2": {0.03125, 0.0078125, 0.001953125}, "H1": {0.5, 0.25, 0.125}},
		Expected:  map[string]float64{"L2": 2, "H1": 1},
		Residuals: []float64{1e-16, 2e-16, 4e-16},
	}
	if err := WriteTable(os.Stdout, s); err != nil {
		fmt.Println(err)
	}
	// Output:
	// problem example, degree 1, structured mesh
	//      level       h  unknowns   H1 error  rate   L2 error  rate  residual
	//          0    0.25        25  5.000e-01     -  3.125e-02     -   1.0e-16
	//          1   0.125        81  2.500e-01  1.00  7.812e-03  2.00   2.0e-16
	//          2  0.0625       289  1.250e-01  1.00  1.953e-03  2.00   4.0e-16
	//   expected                               1.00             2.00
}

func ExampleWriteJSON() {
	s := &Study{
		Problem:  "example",
		Degree:   1,
		Mesh:     "structured",
		H:        []float64{0.5, 0.25},
		Unknowns: []int{9, 25},
		Errors:   map[string][]float64{"L2": {0.25, 0.0625}},
		Rates:    map[string]float64{"L2": 2},
		Expected: map[string]float64{"L2": 2},
	}
	if err := WriteJSON(os.Stdout, s); err != nil {
		fmt.Println(err)
	}
	// Output:
	// {
	//   "problem": "example",
	//   "degree": 1,
	//   "mesh": "structured",
	//   "h": [
	//     0.5,
	//     0.25
	//   ],
	//   "unknowns": [
	//     9,
	//     25
	//   ],
	//   "errors": {
	//     "L2": [
	//       0.25,
	//       0.0625
	//     ]
	//   },
	//   "rates": {
	//     "L2": 2
	//   },
	//   "expected": {
	//     "L2": 2
	//   },
	//   "pair_rates": null,
	//   "residuals": null
	// }
}
