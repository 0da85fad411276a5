package eval

import (
	"fmt"
	"sort"
	"strings"
)

// Group holds detection metrics for the items sharing one value of one
// column (for example fault type "bearing" or SNR band "low").
type Group struct {
	// Name is the column name and Value the column value of the group.
	Name, Value string
	// N is the number of items scored for the group and Anomalies how many
	// of them are anomalies.
	N, Anomalies int
	// AUC is the area under the ROC curve and PAUC the standardised partial
	// area up to the requested max FPR. Both are zero when Err is set.
	AUC, PAUC float64
	// Err is empty on success, otherwise it says why the metrics could not
	// be computed (typically one class missing from the group).
	Err string
}

// ByGroup computes AUC and partial AUC (up to maxFPR) for every value of
// every column. columns maps a column name to one value per item, aligned
// with labels and scores. An empty value, or "none" in any letter case,
// means the item has no value for that column.
//
// Which normal items a group is scored against depends on the column:
//
//   - Anomaly-only columns, where no normal item has a value (fault type,
//     severity): each group is every normal item plus the anomalies with
//     that value. This answers "how well is this kind of fault separated
//     from normal operation". Anomalies without a value belong to no
//     group.
//   - Shared columns, where at least one normal item has a value (an SNR
//     band, a machine, an operating mode): each group is the normal items
//     and the anomalies having that value. Items without a value belong to
//     no group.
//
// Groups are ordered by column name, then value. A group whose metrics are
// undefined (for instance a band with no normal items) is still listed,
// with Err set. ByGroup returns an error only for malformed input: a
// column of the wrong length, an invalid label or score, maxFPR outside
// (0, 1].
func ByGroup(labels []int, scores []float64, columns map[string][]string, maxFPR float64) ([]Group, error) {
	if err := checkMaxFPR(maxFPR); err != nil {
		return nil, err
	}
	if _, err := checkInput(labels, scores); err != nil {
		return nil, err
	}
	names := make([]string, 0, len(columns))
	for name, vals := range columns {
		if len(vals) != len(labels) {
			return nil, fmt.Errorf("%w (column %q has %d values, %d labels)", ErrLengthMismatch, name, len(vals), len(labels))
		}
		names = append(names, name)
	}
	sort.Strings(names)

	var out []Group
	for _, name := range names {
		out = append(out, columnGroups(labels, scores, name, columns[name], maxFPR)...)
	}
	return out, nil
}

// missing reports whether v stands for "no value".
func missing(v string) bool {
	v = strings.TrimSpace(v)
	return v == "" || strings.EqualFold(v, "none")
}

// columnGroups scores every value of one column; see ByGroup for the rule.
func columnGroups(labels []int, scores []float64, name string, vals []string, maxFPR float64) []Group {
	shared := false
	seen := map[string]bool{}
	var values []string
	for i, v := range vals {
		if missing(v) {
			continue
		}
		v = strings.TrimSpace(v)
		if labels[i] == 0 {
			shared = true
		}
		if !seen[v] {
			seen[v] = true
			values = append(values, v)
		}
	}
	sort.Strings(values)

	groups := make([]Group, 0, len(values))
	for _, value := range values {
		var gl []int
		var gs []float64
		for i, v := range vals {
			in := strings.TrimSpace(v) == value && !missing(v)
			if !shared && labels[i] == 0 {
				in = true
			}
			if in {
				gl = append(gl, labels[i])
				gs = append(gs, scores[i])
			}
		}
		groups = append(groups, scoreGroup(name, value, gl, gs, maxFPR))
	}
	return groups
}

// scoreGroup computes the metrics of one group.
func scoreGroup(name, value string, labels []int, scores []float64, maxFPR float64) Group {
	g := Group{Name: name, Value: value, N: len(labels)}
	for _, l := range labels {
		g.Anomalies += l
	}
	auc, err := AUC(labels, scores)
	if err != nil {
		g.Err = err.Error()
		return g
	}
	pauc, err := PartialAUC(labels, scores, maxFPR)
	if err != nil {
		g.Err = err.Error()
		return g
	}
	g.AUC, g.PAUC = auc, pauc
	return g
}
