// Command evaltable prints the mean over several `auscult evaluate --json`
// reports (one per simulated pump) as a Markdown table: AUC per report,
// mean AUC and pAUC, and the level detector's, overall and per group, then
// the mean over fault types.
//
//	go run ./scripts/evaltable seed1/eval.json seed2/eval.json seed3/eval.json
package main

import (
	"encoding/json"
	"fmt"
	"os"
	"strings"
)

type pair struct {
	AUC  float64 `json:"auc"`
	PAUC float64 `json:"pauc"`
}

type group struct {
	Column string `json:"column"`
	Value  string `json:"value"`
	Cosine *pair  `json:"cosine"`
	Level  *pair  `json:"level"`
}

type report struct {
	Cosine pair    `json:"cosine"`
	Level  pair    `json:"level"`
	Groups []group `json:"groups"`
}

func main() {
	if len(os.Args) < 2 {
		fmt.Fprintln(os.Stderr, "usage: evaltable EVAL.json...")
		os.Exit(2)
	}
	var reps []report
	for _, p := range os.Args[1:] {
		data, err := os.ReadFile(p)
		if err != nil {
			fmt.Fprintln(os.Stderr, "evaltable:", err)
			os.Exit(1)
		}
		var r report
		if err := json.Unmarshal(data, &r); err != nil {
			fmt.Fprintf(os.Stderr, "evaltable: %s: %v\n", p, err)
			os.Exit(1)
		}
		reps = append(reps, r)
	}
	n := float64(len(reps))
	fmt.Println("| group | AUC per pump | mean AUC | mean pAUC | level AUC | level pAUC |")
	fmt.Println("|---|---|---|---|---|---|")
	row := func(name string, get func(report) (pair, pair, bool)) {
		var per []string
		var a, p, la, lp float64
		for _, r := range reps {
			c, l, ok := get(r)
			if !ok {
				return
			}
			per = append(per, fmt.Sprintf("%.2f", c.AUC))
			a, p, la, lp = a+c.AUC, p+c.PAUC, la+l.AUC, lp+l.PAUC
		}
		fmt.Printf("| %s | %s | %.3f | %.3f | %.3f | %.3f |\n", name, strings.Join(per, " / "), a/n, p/n, la/n, lp/n)
	}
	row("**all**", func(r report) (pair, pair, bool) { return r.Cosine, r.Level, true })
	var order []group
	seen := map[string]bool{}
	for _, g := range reps[0].Groups {
		if (g.Column == "fault" || g.Column == "severity" || g.Column == "snr_db") && !seen[g.Column+g.Value] {
			seen[g.Column+g.Value] = true
			order = append(order, g)
		}
	}
	for _, want := range order {
		name := want.Value
		if want.Column == "snr_db" {
			name = "SNR " + want.Value + " dB"
		}
		row(name, func(r report) (pair, pair, bool) {
			for _, g := range r.Groups {
				if g.Column == want.Column && g.Value == want.Value && g.Cosine != nil && g.Level != nil {
					return *g.Cosine, *g.Level, true
				}
			}
			return pair{}, pair{}, false
		})
	}
	row("**mean over fault types**", func(r report) (pair, pair, bool) {
		var c, l pair
		k := 0.0
		for _, g := range r.Groups {
			if g.Column == "fault" && g.Cosine != nil && g.Level != nil {
				c.AUC, c.PAUC, l.AUC, l.PAUC = c.AUC+g.Cosine.AUC, c.PAUC+g.Cosine.PAUC, l.AUC+g.Level.AUC, l.PAUC+g.Level.PAUC
				k++
			}
		}
		if k == 0 {
			return c, l, false
		}
		return pair{c.AUC / k, c.PAUC / k}, pair{l.AUC / k, l.PAUC / k}, true
	})
}
