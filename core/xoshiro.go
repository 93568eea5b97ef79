package core

import "math"

// Xoshiro is the xoshiro256** pseudo-random generator with its own normal, exponential, uniform and
// gamma samplers. It uses 64-bit shifts, rotations, xors, additions and multiplications by small
// constants only — WebAssembly does all of these natively — where PCG needs a 128-bit product and
// ChaCha8 vector instructions, which Go's WebAssembly port emulates. It implements rand.Source, so
// rand.New(x) works wherever a *rand.Rand is taken; its own methods avoid that interface call.
//
// The 32 bytes of state are padded to 128 (two cache lines), so generators held side by side in a
// slice by different goroutines never share a line (nor an adjacent-line prefetch pair). A Xoshiro is
// not safe for concurrent use; the zero value is a valid generator (seeded as NewXoshiro(0)) once
// seeded with Seed. Period 2^256 − 1; the output passes BigCrush (Blackman & Vigna).
//
// References:
//   - Blackman D., Vigna S. (2021) Scrambled linear pseudorandom number generators. ACM Trans. Math.
//     Softw. 47(4), 36.
//   - Steele G.L., Lea D., Flood C.H. (2014) Fast splittable pseudorandom number generators. OOPSLA
//     2014, 453–472 (splitmix64, used for seeding).
type Xoshiro struct {
	s [4]uint64
	_ [12]uint64 // padding to 128 bytes
}

// NewXoshiro returns a generator seeded with seed (see Seed).
func NewXoshiro(seed uint64) *Xoshiro {
	x := new(Xoshiro)
	x.Seed(seed)
	return x
}

// NewXoshiroStream returns the generator of stream number stream under seed: its state is filled by
// splitmix64 started from splitmix64(seed) xor stream's own splitmix64 image, so that neighbouring
// seeds and streams start far apart.
func NewXoshiroStream(seed, stream uint64) *Xoshiro {
	x := new(Xoshiro)
	a := seed
	b := ^stream
	x.Seed(splitmix64(&a) ^ splitmix64(&b))
	return x
}

// Seed sets the state to four successive outputs of splitmix64 started at seed (never all zero).
func (x *Xoshiro) Seed(seed uint64) {
	for i := range x.s {
		x.s[i] = splitmix64(&seed)
	}
}

// splitmix64 advances *z by the golden gamma and returns the mixed value (Steele, Lea & Flood 2014).
func splitmix64(z *uint64) uint64 {
	*z += 0x9e3779b97f4a7c15
	v := *z
	v = (v ^ (v >> 30)) * 0xbf58476d1ce4e5b9
	v = (v ^ (v >> 27)) * 0x94d049bb133111eb
	return v ^ (v >> 31)
}

// Uint64 returns the next 64 random bits: rotl(s1·5, 7)·9, then the xoshiro256 state update.
func (x *Xoshiro) Uint64() uint64 {
	s := &x.s
	r := rotl(s[1]*5, 7) * 9
	t := s[1] << 17
	s[2] ^= s[0]
	s[3] ^= s[1]
	s[1] ^= s[2]
	s[0] ^= s[3]
	s[2] ^= t
	s[3] = rotl(s[3], 45)
	return r
}

func rotl(v uint64, k uint) uint64 { return v<<k | v>>(64-k) }

// Float64 returns a uniform variate in [0, 1) with 53 random bits.
func (x *Xoshiro) Float64() float64 { return float64(x.Uint64()>>11) * 0x1p-53 }

// open returns a uniform variate in (0, 1) (the midpoints of the 2^53 cells), safe to take the log of.
func (x *Xoshiro) open() float64 { return (float64(x.Uint64()>>11) + 0.5) * 0x1p-53 }

// Norm returns a standard normal variate by the ziggurat method of Marsaglia and Tsang with 128
// layers, using 64-bit draws: the low 7 bits pick the layer and the top 56 bits, as a signed integer,
// the abscissa (disjoint bits, which avoids the correlation Doornik found when they overlap). About
// 98.8 % of the draws return after one product and one comparison; the base layer's tail beyond
// r = 3.4426 is sampled by Marsaglia's exponential method.
//
// References:
//   - Marsaglia G., Tsang W.W. (2000) The ziggurat method for generating random variables. J. Stat.
//     Softw. 5(8).
//   - Doornik J.A. (2005) An improved ziggurat method to generate normal random samples. Univ. of
//     Oxford working paper.
func (x *Xoshiro) Norm() float64 {
	u := x.Uint64()
	i := u & 0x7f
	j := int64(u) >> 8 // 56 signed bits
	a := j
	if a < 0 {
		a = -a
	}
	if a < zigNormK[i] {
		return float64(j) * zigNormW[i]
	}
	return x.normSlow(i, j)
}

// FillNorm fills dst with independent standard normal variates: the same ziggurat as Norm, with the
// generator step and the fast path written out in one loop, so that a block of variates costs no call
// per variate — which matters under WebAssembly, where Go's calls are dear. The values are those
// successive calls of Norm would return.
func (x *Xoshiro) FillNorm(dst []float64) {
	s0, s1, s2, s3 := x.s[0], x.s[1], x.s[2], x.s[3]
	for k := range dst {
		u := rotl(s1*5, 7) * 9
		t := s1 << 17
		s2 ^= s0
		s3 ^= s1
		s1 ^= s2
		s0 ^= s3
		s2 ^= t
		s3 = rotl(s3, 45)
		i := u & 0x7f
		j := int64(u) >> 8
		a := j
		if a < 0 {
			a = -a
		}
		if a < zigNormK[i] {
			dst[k] = float64(j) * zigNormW[i]
			continue
		}
		// Rare (1.2 %): the wedge or the tail. Hand the state back, take Norm's slow path from the
		// rejected draw on, and resume.
		x.s = [4]uint64{s0, s1, s2, s3}
		dst[k] = x.normSlow(i, j)
		s0, s1, s2, s3 = x.s[0], x.s[1], x.s[2], x.s[3]
	}
	x.s = [4]uint64{s0, s1, s2, s3}
}

// normSlow finishes Norm after draw (i, j) missed the fast path.
func (x *Xoshiro) normSlow(i uint64, j int64) float64 {
	for {
		if i == 0 {
			for {
				t := -math.Log(x.open()) / zigNormR
				y := -math.Log(x.open())
				if y+y >= t*t {
					if j > 0 {
						return zigNormR + t
					}
					return -zigNormR - t
				}
			}
		}
		v := float64(j) * zigNormW[i]
		if zigNormF[i]+x.Float64()*(zigNormF[i-1]-zigNormF[i]) < math.Exp(-0.5*v*v) {
			return v
		}
		u := x.Uint64()
		i = u & 0x7f
		j = int64(u) >> 8
		a := j
		if a < 0 {
			a = -a
		}
		if a < zigNormK[i] {
			return float64(j) * zigNormW[i]
		}
	}
}

// Exp returns a standard exponential variate by the ziggurat method of Marsaglia and Tsang with 256
// layers (low 8 bits: layer, top 56 bits: abscissa); the tail beyond r = 7.6971 is r plus a fresh
// exponential variate (memorylessness).
//
// References:
//   - Marsaglia G., Tsang W.W. (2000) J. Stat. Softw. 5(8).
func (x *Xoshiro) Exp() float64 {
	for {
		u := x.Uint64()
		i := u & 0xff
		j := u >> 8
		if j < zigExpK[i] {
			return float64(j) * zigExpW[i]
		}
		if i == 0 {
			return zigExpR - math.Log(x.open())
		}
		v := float64(j) * zigExpW[i]
		if zigExpF[i]+x.Float64()*(zigExpF[i-1]-zigExpF[i]) < math.Exp(-v) {
			return v
		}
	}
}

// Gamma returns a gamma variate of shape k > 0 and unit scale by Marsaglia and Tsang's squeeze
// method on Norm (with the boost U^(1/k) for k < 1), as core.Gamma does on a *rand.Rand. It panics if
// k is not positive.
//
// References:
//   - Marsaglia G., Tsang W.W. (2000) A simple method for generating gamma variables. ACM Trans. Math.
//     Softw. 26, 363–372.
func (x *Xoshiro) Gamma(k float64) float64 {
	if !(k > 0) {
		panic("core: Xoshiro.Gamma: shape must be positive")
	}
	if k < 1 {
		return x.Gamma(k+1) * math.Pow(x.open(), 1/k)
	}
	d := k - 1.0/3
	c := 1 / math.Sqrt(9*d)
	for {
		z := x.Norm()
		v := 1 + c*z
		if v <= 0 {
			continue
		}
		v = v * v * v
		u := x.open()
		z2 := z * z
		if u < 1-0.0331*z2*z2 || math.Log(u) < 0.5*z2+d*(1-v+math.Log(v)) {
			return d * v
		}
	}
}

// Ziggurat constants (Marsaglia & Tsang 2000, from memory; checked in xoshiro_test.go by the area
// condition v = r·f(r) + ∫_r^∞ f of equal-area layers): the base layer's edge r and the common area v
// of the layers, for f(x) = e^{−x²/2} with 128 layers and f(x) = e^{−x} with 256.
const (
	zigNormR = 3.442619855899
	zigNormV = 9.91256303526217e-3
	zigExpR  = 7.697117470131487
	zigExpV  = 3.949659822581572e-3
)

// Tables: K[i] is the acceptance bound of layer i in units of the abscissa's integer scale, W[i]
// the scale to x, F[i] = f(x_i) at the layer's upper edge.
var (
	zigNormK [128]int64
	zigNormW [128]float64
	zigNormF [128]float64
	zigExpK  [256]uint64
	zigExpW  [256]float64
	zigExpF  [256]float64
)

func init() {
	const m1 = 1 << 55 // scale of the 56-bit signed abscissa
	dn, tn := zigNormR, zigNormR
	q := zigNormV / math.Exp(-0.5*dn*dn)
	zigNormK[0] = int64(dn / q * m1)
	zigNormK[1] = 0
	zigNormW[0] = q / m1
	zigNormW[127] = dn / m1
	zigNormF[0] = 1
	zigNormF[127] = math.Exp(-0.5 * dn * dn)
	for i := 126; i >= 1; i-- {
		dn = math.Sqrt(-2 * math.Log(zigNormV/dn+math.Exp(-0.5*dn*dn)))
		zigNormK[i+1] = int64(dn / tn * m1)
		tn = dn
		zigNormF[i] = math.Exp(-0.5 * dn * dn)
		zigNormW[i] = dn / m1
	}

	const m2 = 1 << 56 // scale of the 56-bit unsigned abscissa
	de, te := zigExpR, zigExpR
	q = zigExpV / math.Exp(-de)
	zigExpK[0] = uint64(de / q * m2)
	zigExpK[1] = 0
	zigExpW[0] = q / m2
	zigExpW[255] = de / m2
	zigExpF[0] = 1
	zigExpF[255] = math.Exp(-de)
	for i := 254; i >= 1; i-- {
		de = -math.Log(zigExpV/de + math.Exp(-de))
		zigExpK[i+1] = uint64(de / te * m2)
		te = de
		zigExpF[i] = math.Exp(-de)
		zigExpW[i] = de / m2
	}
}
