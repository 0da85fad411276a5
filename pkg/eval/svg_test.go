package eval

import (
	"bytes"
	"encoding/xml"
	"errors"
	"io"
	"math"
	"strings"
	"testing"
)

// checkXML parses b fully and fails the test on malformed XML.
func checkXML(t *testing.T, b []byte) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(b))
	for {
		_, err := d.Token()
		if err == io.EOF {
			return
		}
		if err != nil {
			t.Fatalf("invalid XML: %v\n%s", err, b)
		}
	}
}

func TestWriteROCSVG(t *testing.T) {
	fpr, tpr, _, err := ROC([]int{0, 1, 0, 1, 0, 1}, []float64{0.1, 0.8, 0.4, 0.35, 0.2, 0.9})
	if err != nil {
		t.Fatal(err)
	}
	many := make([]Curve, 9)
	for i := range many {
		many[i] = Curve{Name: "pump-" + string(rune('a'+i)), FPR: fpr, TPR: tpr, AUC: 0.5}
	}
	tests := []struct {
		name   string
		curves []Curve
		title  string
		want   []string
	}{
		{"one curve", []Curve{{Name: "skid 3 <east> & co", FPR: fpr, TPR: tpr, AUC: 0.8889}}, "ROC \"test\" <1>",
			[]string{"false positive rate", "true positive rate", "AUC 0.889", "skid 3 &lt;east&gt; &amp; co"}},
		{"no curves", nil, "empty", []string{"chance"}},
		{"many curves", many, "many", []string{`stroke-dasharray="7 3"`}},
		{"NaN AUC", []Curve{{Name: "x", FPR: fpr, TPR: tpr, AUC: math.NaN()}}, "t", []string{"AUC n/a"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var b bytes.Buffer
			if err := WriteROCSVG(&b, tt.curves, tt.title); err != nil {
				t.Fatal(err)
			}
			checkXML(t, b.Bytes())
			for _, w := range tt.want {
				if !strings.Contains(b.String(), w) {
					t.Errorf("output lacks %q", w)
				}
			}
			for _, ext := range []string{"href", "<style", "@import", "url("} {
				if strings.Contains(b.String(), ext) {
					t.Errorf("output refers to external resources (%q)", ext)
				}
			}
		})
	}
}

func TestWriteROCSVGBadCurve(t *testing.T) {
	tests := []struct {
		name  string
		curve Curve
	}{
		{"empty", Curve{Name: "e"}},
		{"lengths", Curve{FPR: []float64{0, 1}, TPR: []float64{0}}},
		{"outside", Curve{FPR: []float64{0, 1.5}, TPR: []float64{0, 1}}},
		{"NaN", Curve{FPR: []float64{0, math.NaN()}, TPR: []float64{0, 1}}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var b bytes.Buffer
			if err := WriteROCSVG(&b, []Curve{tt.curve}, "t"); !errors.Is(err, ErrBadCurve) {
				t.Errorf("error = %v, want ErrBadCurve", err)
			}
			if b.Len() != 0 {
				t.Errorf("wrote %d bytes despite the error", b.Len())
			}
		})
	}
}

// failWriter fails every write.
type failWriter struct{}

func (failWriter) Write([]byte) (int, error) { return 0, errors.New("disk full") }

func TestWriteROCSVGWriterError(t *testing.T) {
	if err := WriteROCSVG(failWriter{}, nil, "t"); err == nil || err.Error() != "disk full" {
		t.Errorf("error = %v, want the writer's error", err)
	}
}
