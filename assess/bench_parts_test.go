package assess

import (
	"testing"

	"holdfast/sample"
)

// BenchmarkDrawParts splits one lake draw's cost on one core: the whole
// draw (search, classification, barriers, tracking, aggregation), the
// equilibrium search alone, the native scan + Brent reference, and one
// evaluation of the compiled and the hand-written rate law. Run with -cpu 1.
func BenchmarkDrawParts(b *testing.B) {
	m := lakeModel(b)
	d, _ := m.Design(sample.Random, 4096, 1)
	nom, _ := m.Analyze(m.Nominal)
	w, _ := newWorker(m, d.Draw, nom)
	thetas := make([][]float64, 4096)
	for i := range thetas {
		thetas[i] = make([]float64, 5)
		d.Draw(i, thetas[i])
	}
	b.Run("draw", func(b *testing.B) {
		i := 0
		for b.Loop() {
			w.draw(i&4095, nil)
			i++
		}
	})
	b.Run("find", func(b *testing.B) {
		i := 0
		for b.Loop() {
			copy(w.f.Theta, thetas[i&4095])
			w.finder.Find(w.f, 0, 5)
			i++
		}
	})
	b.Run("native", func(b *testing.B) {
		i := 0
		for b.Loop() {
			th := thetas[i&4095]
			f := func(P float64) float64 { return lakeF(P, th) }
			xa, fa := 0.0, f(0)
			for k := 1; k <= 200; k++ {
				xb := 5 * float64(k) / 200
				fb := f(xb)
				if fa*fb < 0 {
					brent(f, xa, xb, fa, fb, 1e-12)
				}
				xa, fa = xb, fb
			}
			i++
		}
	})
	b.Run("eval", func(b *testing.B) {
		i := 0
		for b.Loop() {
			copy(w.f.Theta, thetas[i&4095])
			w.f.Eval(0.5 + float64(i&7)*0.3)
			i++
		}
	})
	b.Run("nativeEval", func(b *testing.B) {
		i := 0
		for b.Loop() {
			lakeF(0.5+float64(i&7)*0.3, thetas[i&4095])
			i++
		}
	})
}
