package core_test

import (
	"errors"
	"fmt"

	"sizebudget/core"
)

// IAPWS R12-08 Table 4: the correlation at three of its check points (μ2 = 1). Published values:
// 889.735100, 307.883622 and 77.430195 µPa·s.
func ExampleWaterViscosityIAPWS() {
	for _, p := range []struct{ T, rho float64 }{{298.15, 998}, {373.15, 1000}, {873.15, 600}} {
		fmt.Printf("T = %7.2f K, ρ = %4.0f kg/m³: μ = %.6f µPa·s\n", p.T, p.rho, core.WaterViscosityIAPWS(p.T, p.rho)*1e6)
	}
	// Output:
	// T =  298.15 K, ρ =  998 kg/m³: μ = 889.735100 µPa·s
	// T =  373.15 K, ρ = 1000 kg/m³: μ = 307.883622 µPa·s
	// T =  873.15 K, ρ =  600 kg/m³: μ = 77.430195 µPa·s
}

// IAPWS-IF97 Table 5: region-1 specific volumes to the nine digits IF97 prints (0.100215168e-2,
// 0.971180894e-3 and 0.120241800e-2 m³/kg).
func ExampleWaterDensityIF97() {
	for _, p := range [][2]float64{{300, 3}, {300, 80}, {500, 3}} {
		rho, err := core.WaterDensityIF97(p[0], p[1])
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Printf("v(%g K, %g MPa) = %.8e m³/kg\n", p[0], p[1], 1/rho)
	}
	// Output:
	// v(300 K, 3 MPa) = 1.00215168e-03 m³/kg
	// v(300 K, 80 MPa) = 9.71180894e-04 m³/kg
	// v(500 K, 3 MPa) = 1.20241800e-03 m³/kg
}

// IAPWS-IF97 Table 35 (from memory): saturation pressures, nine significant digits.
func ExampleWaterSaturationPressureIF97() {
	for _, T := range []float64{300, 500, 600} {
		p, _ := core.WaterSaturationPressureIF97(T)
		fmt.Printf("p_s(%g K) = %.8e MPa\n", T, p)
	}
	// Output:
	// p_s(300 K) = 3.53658941e-03 MPa
	// p_s(500 K) = 2.63889776e+00 MPa
	// p_s(600 K) = 1.23443146e+01 MPa
}

// IAPWS SR6-08 check values for liquid water at 0.1 MPa: 889.996774, 276.207245 and
// 3058.36075 µPa·s.
func ExampleWaterViscositySR6() {
	for _, T := range []float64{298.15, 375, 260} {
		mu, _ := core.WaterViscositySR6(T)
		fmt.Printf("μ(%g K) = %.9g µPa·s\n", T, mu*1e6)
	}
	// Output:
	// μ(298.15 K) = 889.996774 µPa·s
	// μ(375 K) = 276.207245 µPa·s
	// μ(260 K) = 3058.36075 µPa·s
}

// Water at atmospheric pressure at 20 °C gives the ISO/TR 3666 reference value 1.0016 mPa·s (from
// memory); above the boiling point the medium refuses the temperature.
func ExampleWater() {
	w := core.Water{} // 0.101325 MPa
	eta, _ := w.Viscosity(293.15)
	fmt.Printf("η(20 °C) = %.4f mPa·s, relative standard uncertainty %.0f %%\n", eta*1e3, 100*w.RelativeUncertainty(293.15))

	_, err := w.Viscosity(380)
	var re *core.RangeError
	if errors.As(err, &re) {
		fmt.Printf("%s = %g K is above %.3f K\n", re.Field, re.Value, re.Max)
	}
	// Output:
	// η(20 °C) = 1.0016 mPa·s, relative standard uncertainty 1 %
	// temperature_K = 380 K is above 373.124 K
}
