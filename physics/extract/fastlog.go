package extract

import "math"

// logTableBits sets the size of fastLog's table (2^8 = 256 intervals).
const logTableBits = 8

// logOff is the bit pattern of 0.6875: fastLog reduces x to z in
// [0.6875, 1.375) times a power of two.
const logOff = 0x3fe6000000000000

// logEntry holds, for one subinterval of z, invc = 1/c for a point c of
// the interval (c = 1 exactly where the interval holds 1) and
// logc = ln c = -ln(invc).
type logEntry struct{ invc, logc float64 }

// logTable is fastLog's table, built once from math.Log and only read
// after.
var logTable = func() (t [1 << logTableBits]logEntry) {
	for i := range t {
		lo := math.Float64frombits(logOff + uint64(i)<<(52-logTableBits))
		hi := math.Float64frombits(logOff + uint64(i+1)<<(52-logTableBits))
		c := 0.5 * (lo + hi)
		if lo <= 1 && 1 < hi {
			c = 1
		}
		inv := 1 / c
		t[i] = logEntry{inv, -math.Log(inv)}
	}
	return t
}()

// fastLog is the natural logarithm ln x, within 2 ulp of math.Log
// (TestFastLog: every scale of the doubles and dense grids near 1), at
// about half its cost and without a division: it is the inner operation of
// every point of every least-squares evaluation of an I-V fit.
//
// Method (table-driven argument reduction, common practice in libm
// implementations): x = 2^k z with z in [0.6875, 1.375); z falls in one of
// 256 intervals of equal width, with a point c where ln c is tabulated;
// r = z/c - 1 is formed by one fused multiply-add (|r| < 0.003), and
//
//	ln x = k ln 2 + ln c + ln(1 + r),
//	ln(1 + r) = r - r^2/2 + r^3/3 - ... + r^7/7 (Taylor; the next term is
//	below 1e-21), the polynomial evaluated in pairs (Estrin's scheme) to
//	shorten the chain of dependent operations.
//
// ln 2 is split into a high part exact in k ln2hi and a low part (fdlibm's
// constants). Within 1/64 of 1, where the sum of ln c and r would cancel,
// it returns math.Log1p(x - 1) (x - 1 is exact there); zero, subnormal,
// negative, infinite and NaN arguments go to math.Log.
func fastLog(x float64) float64 {
	const (
		ln2hi = 6.93147180369123816490e-01 // fdlibm e_log.c
		ln2lo = 1.90821492927058770002e-10
	)
	ix := math.Float64bits(x)
	if ix-0x0010000000000000 >= 0x7ff0000000000000-0x0010000000000000 {
		return math.Log(x) // zero, subnormal, negative, Inf, NaN
	}
	if ix-0x3fef800000000000 < 0x0000c00000000000 { // 1-1/64 <= x < 1+1/64
		return math.Log1p(x - 1)
	}
	tmp := ix - logOff
	i := (tmp >> (52 - logTableBits)) % (1 << logTableBits)
	k := int64(tmp) >> 52
	z := math.Float64frombits(ix - tmp&(0xfff<<52))
	e := &logTable[i]
	r := math.FMA(z, e.invc, -1)
	kd := float64(k)
	w := kd*ln2hi + e.logc
	hi := w + r
	lo := w - hi + r + kd*ln2lo
	r2 := r * r
	r4 := r2 * r2
	p := r2*(-0.5+r*(1.0/3)) + r4*((-0.25+r*0.2)+r2*(-1.0/6+r*(1.0/7)))
	return hi + (lo + p)
}
