package uncertainty_test

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"sizebudget/uncertainty"
)

// JCGM 101:2008 clause 9.2.2: the additive model Y = X1 + X2 + X3 + X4 with four standard normal
// inputs. The published Monte Carlo figures are u(y) = 2.00 and the 95 % interval [−3.92, 3.92]
// (REFERENCES.md §7, as transcribed); printed to those digits, under a fixed seed.
func ExamplePropagate_jcgm101Clause922() {
	model := func(r *rand.Rand, y []float64) {
		for i := range y {
			y[i] = r.NormFloat64() + r.NormFloat64() + r.NormFloat64() + r.NormFloat64()
		}
	}
	res, err := uncertainty.Propagate(context.Background(), model, uncertainty.Options{Trials: 1_000_000, Seed: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("u(y) = %.2f\n", res.StdUnc)
	fmt.Printf("95 %% interval [%.2f, %.2f]\n", res.Low, res.High)
	// Output:
	// u(y) = 2.00
	// 95 % interval [-3.92, 3.92]
}

// JCGM 101:2008 clause 9.2.4: three inputs R(−√3, √3) and one R(−10√3, 10√3). The Monte Carlo 95 %
// interval is ±17.0, the GUM uncertainty framework's ±19.9 (REFERENCES.md §7, as transcribed), and
// the comparison of clause 8 at two significant digits does not validate the framework.
func ExampleValidateGUM_jcgm101Clause924() {
	s3 := math.Sqrt(3)
	model := func(r *rand.Rand, y []float64) {
		for i := range y {
			y[i] = s3*(2*r.Float64()-1) + s3*(2*r.Float64()-1) + s3*(2*r.Float64()-1) + 10*s3*(2*r.Float64()-1)
		}
	}
	res, err := uncertainty.Propagate(context.Background(), model, uncertainty.Options{Trials: 1_000_000, Seed: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	uGUF := math.Sqrt(3*1 + 10*10) // law of propagation, unit sensitivities
	UGUF := 1.96 * uGUF
	v := uncertainty.ValidateGUM(res, 0, UGUF, 2)
	fmt.Printf("MCM 95 %% interval [%.1f, %.1f]\n", res.Low, res.High)
	fmt.Printf("GUF 95 %% interval [%.1f, %.1f]\n", -UGUF, UGUF)
	fmt.Printf("d_low = %.1f, d_high = %.1f, δ = %.1f: validated %v\n", v.DLow, v.DHigh, v.Delta, v.Passed)
	// Output:
	// MCM 95 % interval [-17.0, 17.0]
	// GUF 95 % interval [-19.9, 19.9]
	// d_low = 2.9, d_high = 2.9, δ = 0.5: validated false
}
