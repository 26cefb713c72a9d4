package peaktable

import (
	"math"
	"path/filepath"
	"strings"
	"testing"
)

func read(t *testing.T, name string, cols Columns) *Table {
	t.Helper()
	tab, err := Read(filepath.Join("..", "..", "testdata", "peaktables", name), cols)
	if err != nil {
		t.Fatal(err)
	}
	return tab
}

func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol }

func TestBOMSecondsFooter(t *testing.T) {
	tab := read(t, "bom-seconds-footer.csv", Columns{})
	if tab.Separator != "," || tab.TimeUnit != "s" || tab.WidthKind != "half-height" || !tab.Header {
		t.Fatalf("decided %+v", tab)
	}
	if len(tab.Peaks) != 4 {
		t.Fatalf("%d peaks (the footer must be left out)", len(tab.Peaks))
	}
	p := tab.Peaks[0]
	if p.Name != "hexanal" || !near(p.TimeMin, 227.40/60, 1e-12) || !near(p.WidthMin, 1.98/60, 1e-12) || p.Area != 15234.1 || p.Height != 2210.5 {
		t.Fatalf("%+v", p)
	}
	if tab.Peaks[1].Name != "" || tab.Peaks[3].Name != "octanal" || tab.Peaks[3].Line != 5 {
		t.Fatalf("%+v", tab.Peaks)
	}
}

func TestSemicolonDecimalComma(t *testing.T) {
	tab := read(t, "semicolon-comma.csv", Columns{})
	if tab.Separator != ";" || tab.Decimal != "," || tab.TimeUnit != "min" {
		t.Fatalf("decided %+v", tab)
	}
	if len(tab.Peaks) != 4 || !near(tab.Peaks[1].TimeMin, 3.8786, 1e-12) || tab.Peaks[2].Name != "(E)-2-hexenal" || !near(tab.Peaks[3].Area, 18000.2, 1e-9) || !near(tab.Peaks[0].WidthMin, 0.033, 1e-12) {
		t.Fatalf("%+v", tab.Peaks)
	}
}

func TestTabNoHeader(t *testing.T) {
	tab := read(t, "tab-noheader.txt", Columns{})
	if tab.Separator != "tab" || tab.Header || tab.Columns["time"] != 1 {
		t.Fatalf("decided %+v", tab)
	}
	if len(tab.Peaks) != 4 || tab.Peaks[3].TimeMin != 7.5840 || tab.Peaks[0].HasArea {
		t.Fatalf("%+v", tab.Peaks)
	}
	// columns given: area is column 3
	tab = read(t, "tab-noheader.txt", Columns{Time: "2", Area: "3"})
	if !tab.Peaks[0].HasArea || tab.Peaks[0].Area != 15234 {
		t.Fatalf("%+v", tab.Peaks[0])
	}
}

func TestExtraColumnsQuotedBaseWidth(t *testing.T) {
	tab := read(t, "extra-columns-quoted.csv", Columns{})
	if tab.WidthKind != "base" || tab.Columns["time"] != 2 || tab.Columns["area"] != 4 {
		t.Fatalf("decided %+v", tab)
	}
	p := tab.Peaks[1]
	if p.Name != "ethyl butyrate, tentative" || p.TimeMin != 3.8786 {
		t.Fatalf("%+v", p)
	}
	// base width 4σ -> half-height width 2.3548σ
	if !near(p.WidthMin, 0.0570*2.3548200450309493/4, 1e-12) {
		t.Fatalf("width %v", p.WidthMin)
	}
	// the user may say otherwise
	tab = read(t, "extra-columns-quoted.csv", Columns{WidthKind: "half-height"})
	if tab.Peaks[1].WidthMin != 0.0570 {
		t.Fatal(tab.Peaks[1].WidthMin)
	}
}

func TestUndecidableSaysWhat(t *testing.T) {
	for file, want := range map[string]string{
		"ambiguous-columns.csv": "retention-time column",
		"ambiguous-unit.csv":    "time unit",
	} {
		_, err := Read(filepath.Join("..", "..", "testdata", "peaktables", file), Columns{})
		if err == nil || !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), "[run.columns]") {
			t.Errorf("%s: %v", file, err)
		}
	}
	if tab := read(t, "ambiguous-unit.csv", Columns{TimeUnit: "s"}); tab.Peaks[0].TimeMin != 2 {
		t.Errorf("time_unit s: %+v", tab.Peaks[0])
	}
	if tab := read(t, "ambiguous-columns.csv", Columns{Time: "1"}); tab.Peaks[2].TimeMin != 2.6 {
		t.Errorf("time = 1: %+v", tab.Peaks)
	}
}

func TestBadRowsNameLineAndField(t *testing.T) {
	cases := map[string]string{
		"RT (min),Area\n1.0,10\nabc,20\n2.0,30\n": `x.csv:3: column 1 "RT (min)": "abc" is not a number`,
		"RT (min),Area\n1.0,10\n2.0,-5\n":         `x.csv:3: column 2 "Area": "-5" is not a non-negative number`,
		"RT (min),Area\n-1.0,10\n":                `x.csv:2: column 1 "RT (min)": "-1.0": a retention time must be positive`,
		"":                                        "x.csv: empty",
		"\xff\xfeR\x00":                           "UTF-16",
		"RT;Area\n1,5;2\n1.5;3\n":                 "both 3,14 and 3.14",
	}
	for in, want := range cases {
		_, err := Parse("x.csv", []byte(in), Columns{})
		if err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("%q: got %v, want %q", in, err, want)
		}
	}
}

func TestDialectsAgree(t *testing.T) {
	// the same table written in the three dialects reads the same
	rows := [][]string{{"1", "3.6233", "1523.4", "0.0330", "hexanal"}, {"2", "3.8786", "998.8", "0.0335", ""}, {"3", "14.3698", "2011.7", "0.0390", "camphene"}}
	write := func(sep, dec string) string {
		var b strings.Builder
		b.WriteString(strings.Join([]string{"#", "RT (min)", "Area", "FWHM (min)", "Name"}, sep) + "\n")
		for _, r := range rows {
			c := append([]string(nil), r...)
			for i := 1; i <= 3; i++ {
				c[i] = strings.ReplaceAll(c[i], ".", dec)
			}
			b.WriteString(strings.Join(c, sep) + "\n")
		}
		return b.String()
	}
	var ref *Table
	for _, d := range [][2]string{{",", "."}, {";", ","}, {"\t", "."}, {"\t", ","}} {
		tab, err := Parse("d.csv", []byte(write(d[0], d[1])), Columns{})
		if err != nil {
			t.Fatal(d, err)
		}
		if ref == nil {
			ref = tab
			continue
		}
		for i := range tab.Peaks {
			a, b := tab.Peaks[i], ref.Peaks[i]
			if a.TimeMin != b.TimeMin || a.Area != b.Area || a.WidthMin != b.WidthMin || a.Name != b.Name {
				t.Errorf("%q: %+v != %+v", d, a, b)
			}
		}
	}
}

func TestThousandsSeparators(t *testing.T) {
	for in, want := range map[string]float64{
		"RT (min);Area\n3,62;1.234.567,5\n4,10;12,0\n": 1234567.5,
		"RT (min)\tArea\n3.62\t15,234.1\n4.10\t12.0\n": 15234.1,
		"\"RT (min)\",\"Area\"\n3.62,\"15,234.1\"\n":   15234.1,
	} {
		tab, err := Parse("t.csv", []byte(in), Columns{})
		if err != nil {
			t.Errorf("%q: %v", in, err)
			continue
		}
		if tab.Peaks[0].Area != want || tab.Peaks[0].TimeMin != 3.62 {
			t.Errorf("%q: %+v", in, tab.Peaks[0])
		}
	}
	// 1,5 with a point elsewhere is not a thousands group
	if _, err := Parse("t.csv", []byte("RT;Area\n1,5;2.5\n"), Columns{}); err == nil {
		t.Error("mixed marks accepted")
	}
}
