package embed

// Dim describes one dimension of Window.Vec, so a deviation can be reported
// as a frequency range a technician understands.
type Dim struct {
	// Part is "mel_mean", "mel_std", "mel_low" or "fine".
	Part string `json:"part"`
	// LoHz and HiHz bound the band the dimension measures.
	LoHz float64 `json:"lo_hz"`
	HiHz float64 `json:"hi_hz"`
}

// Layout returns one Dim per dimension of Window.Vec, in order.
func (e *Embedder) Layout() []Dim {
	out := make([]Dim, 0, e.dim)
	bank := e.ext.Bank()
	for i := 0; i < e.nMel; i++ {
		lo, hi := bank.Edges(i)
		out = append(out, Dim{Part: "mel_mean", LoHz: lo, HiHz: hi})
	}
	for i := 0; i < e.nStd; i++ {
		lo, hi := bank.Edges(i)
		out = append(out, Dim{Part: "mel_std", LoHz: lo, HiHz: hi})
	}
	for i := 0; i < e.nLow; i++ {
		lo, hi := bank.Edges(i)
		out = append(out, Dim{Part: "mel_low", LoHz: lo, HiHz: hi})
	}
	for i := 0; i < e.nFine; i++ {
		lo, hi := e.fineBank.Edges(i)
		out = append(out, Dim{Part: "fine", LoHz: lo, HiHz: hi})
	}
	return out
}
