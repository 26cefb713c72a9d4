package model

// ReferenceRetention exposes the brute-force reference to the external
// benchmarks: retention time and sigma (s) of compound c (nil: unretained).
func ReferenceRetention(cond *Conditions, c *Compound, p Program) (tr, sigma float64) {
	r := referenceElute(cond, c, p)
	return r.tr, r.sigma
}
