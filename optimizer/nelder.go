package optimizer

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/optimize"
)

// nelderMead is gonum's optimize.NelderMead (the same steps, in the same
// order and the same floating-point operations) as optimize.Minimize runs
// it with one evaluation at a time, a FunctionConverge converger, a limit
// on evaluations and a Status callback, but stepped in the calling
// goroutine: Minimize hands every evaluation between goroutines over
// channels, about 1.4 µs an evaluation with a trivial objective on the
// 2-core CI machine (a third of a 20-compound simulation). A search can
// also be held after some evaluations and taken up again later (run).
// TestNelderMeadAsGonum checks that it visits exactly the points Minimize
// does.
type nelderMead struct {
	fn func(x []float64) float64
	// stopped is Minimize's Problem.Status: asked before the first
	// evaluation and after every one; true ends the search.
	stopped  func() bool
	maxEvals int
	size     float64
	conv     optimize.FunctionConverge
	loc      optimize.Location // for conv

	dim                                       int
	reflection, expansion, contraction, shrnk float64

	x, xe     []float64 // the point to evaluate (Minimize's loc.X); a copy handed to fn
	fx        float64   // the value at x once evaluated
	evals     int
	phase     nmPhase
	last      nmStep
	fillIdx   int
	vertices  [][]float64 // sorted by value, best first
	values    []float64
	centroid  []float64 // of all but the worst vertex
	reflected []float64
	reflValue float64
}

type nmPhase int

const (
	nmEvaluate nmPhase = iota // x is to be evaluated
	nmCheck                   // x was evaluated; the limits are to be checked
	nmDone
)

// nmStep is what the last evaluation was (gonum's nmIterType).
type nmStep int

const (
	nmFirst nmStep = iota // the starting point
	nmInitialize
	nmReflected
	nmExpanded
	nmContractedInside
	nmContractedOutside
	nmShrink
)

// newNelderMead prepares a search from x0 with an initial simplex of the
// given size, at most maxEvals evaluations and converging as
// FunctionConverge{Absolute: 1e-4, Relative: 1e-9, Iterations: 60} does.
func newNelderMead(fn func([]float64) float64, stopped func() bool, x0 []float64, size float64, maxEvals int) *nelderMead {
	dim := len(x0)
	nm := &nelderMead{fn: fn, stopped: stopped, maxEvals: maxEvals, size: size, dim: dim,
		conv: optimize.FunctionConverge{Absolute: 1e-4, Relative: 1e-9, Iterations: 60}}
	nm.conv.Init(dim)
	nm.x = append([]float64(nil), x0...)
	nm.xe = make([]float64, dim)
	nm.phase, nm.last = nmEvaluate, nmFirst
	if stopped() {
		nm.phase = nmDone // Minimize asks Status once before anything
	}
	return nm
}

// run goes on with the search until it ends, or until it has made until
// evaluations (it can then be run again, or left).
func (nm *nelderMead) run(until int) {
	for {
		switch nm.phase {
		case nmDone:
			return
		case nmEvaluate:
			copy(nm.xe, nm.x)
			nm.fx = nm.fn(nm.xe)
			nm.evals++
			nm.phase = nmCheck
			if nm.stopped() {
				nm.phase = nmDone
				return
			}
		case nmCheck:
			if nm.evals >= until && until < nm.maxEvals {
				return // held
			}
			if nm.maxEvals > 0 && nm.evals >= nm.maxEvals {
				nm.phase = nmDone
				return
			}
			nm.phase = nmEvaluate
			nm.next()
		}
	}
}

// done reports whether the search has ended.
func (nm *nelderMead) done() bool { return nm.phase == nmDone }

// major is Minimize's MajorIteration at the best vertex (value f): true
// when the search has converged.
func (nm *nelderMead) major(f float64) bool {
	if math.IsInf(f, -1) {
		return true
	}
	nm.loc.F = f
	return nm.conv.Converged(&nm.loc) != optimize.NotTerminated
}

// next takes the value fx at x and sets x to the next point to evaluate
// (gonum's localOptimizer.run, NelderMead.initLocal and iterateLocal).
func (nm *nelderMead) next() {
	dim := nm.dim
	f := nm.fx
	switch nm.last {
	case nmFirst:
		if math.IsInf(f, 1) || math.IsNaN(f) || nm.major(f) {
			nm.phase = nmDone
			return
		}
		nm.init()
		nm.vertices[dim] = append(nm.vertices[dim][:0], nm.x...)
		nm.values[dim] = f
		nm.fillIdx = 0
		nm.x[nm.fillIdx] += nm.size
		nm.last = nmInitialize
	case nmInitialize:
		nm.values[nm.fillIdx] = f
		copy(nm.vertices[nm.fillIdx], nm.x)
		nm.fillIdx++
		if nm.fillIdx == dim {
			sort.Sort(nmSorter{nm.vertices, nm.values})
			nm.computeCentroid()
			nm.toMajor()
			return
		}
		copy(nm.x, nm.vertices[dim])
		nm.x[nm.fillIdx] += nm.size
	case nmReflected:
		nm.reflValue = f
		switch {
		case f >= nm.values[0] && f < nm.values[dim-1]:
			nm.replaceWorst(nm.x, f)
			nm.toMajor()
		case f < nm.values[0]:
			nm.step(nmExpanded)
		default:
			if f < nm.values[dim] {
				nm.step(nmContractedOutside)
			} else {
				nm.step(nmContractedInside)
			}
		}
	case nmExpanded:
		if f < nm.reflValue {
			nm.replaceWorst(nm.x, f)
		} else {
			nm.replaceWorst(nm.reflected, nm.reflValue)
		}
		nm.toMajor()
	case nmContractedOutside:
		if f <= nm.reflValue {
			nm.replaceWorst(nm.x, f)
			nm.toMajor()
			return
		}
		nm.fillIdx = 1
		nm.step(nmShrink)
	case nmContractedInside:
		if f < nm.values[dim] {
			nm.replaceWorst(nm.x, f)
			nm.toMajor()
			return
		}
		nm.fillIdx = 1
		nm.step(nmShrink)
	case nmShrink:
		copy(nm.vertices[nm.fillIdx], nm.x)
		nm.values[nm.fillIdx] = f
		nm.fillIdx++
		if nm.fillIdx != dim+1 {
			nm.step(nmShrink)
			return
		}
		sort.Sort(nmSorter{nm.vertices, nm.values})
		nm.computeCentroid()
		nm.toMajor()
	}
}

// init sizes the simplex and sets the dimension-dependent parameters
// (gonum's defaults).
func (nm *nelderMead) init() {
	dim := nm.dim
	nm.vertices = make([][]float64, dim+1)
	for i := range nm.vertices {
		nm.vertices[i] = make([]float64, dim)
	}
	nm.values = make([]float64, dim+1)
	nm.centroid = make([]float64, dim)
	nm.reflected = make([]float64, dim)
	nm.reflection = 1
	nm.expansion = 1 + 2/float64(dim)
	nm.contraction = 0.75 - 1/(2*float64(dim))
	nm.shrnk = 1 - 1/float64(dim)
	if dim == 1 {
		nm.expansion, nm.contraction, nm.shrnk = 2, 0.5, 0.5
	}
}

// toMajor is a major iteration at the best vertex, then a reflection.
func (nm *nelderMead) toMajor() {
	if nm.major(nm.values[0]) {
		nm.phase = nmDone
		return
	}
	nm.step(nmReflected)
}

// step sets x to the point of the given step.
func (nm *nelderMead) step(s nmStep) {
	nm.last = s
	dim := nm.dim
	if s == nmShrink {
		// x = best + shrink·(vertex − best)
		floats.SubTo(nm.x, nm.vertices[nm.fillIdx], nm.vertices[0])
		floats.Scale(nm.shrnk, nm.x)
		floats.Add(nm.x, nm.vertices[0])
		return
	}
	// x = centroid + scale·(centroid − worst)
	var scale float64
	switch s {
	case nmReflected:
		scale = nm.reflection
	case nmExpanded:
		scale = nm.reflection * nm.expansion
	case nmContractedOutside:
		scale = nm.reflection * nm.contraction
	case nmContractedInside:
		scale = -nm.contraction
	}
	floats.SubTo(nm.x, nm.centroid, nm.vertices[dim])
	floats.Scale(scale, nm.x)
	floats.Add(nm.x, nm.centroid)
	if s == nmReflected {
		copy(nm.reflected, nm.x)
	}
}

func (nm *nelderMead) computeCentroid() {
	dim := nm.dim
	c := nm.centroid
	for i := range c {
		c[i] = 0
	}
	for i := 0; i < dim; i++ {
		for j, v := range nm.vertices[i] {
			c[j] += v
		}
	}
	for i := range c {
		c[i] /= float64(dim)
	}
}

// replaceWorst puts {x, f} in place of the worst vertex, keeping the order,
// and updates the centroid.
func (nm *nelderMead) replaceWorst(x []float64, f float64) {
	dim := nm.dim
	copy(nm.vertices[dim], x)
	nm.values[dim] = f
	for i := dim - 1; i >= 0; i-- {
		if nm.values[i] < f {
			break
		}
		nm.vertices[i], nm.vertices[i+1] = nm.vertices[i+1], nm.vertices[i]
		nm.values[i], nm.values[i+1] = nm.values[i+1], nm.values[i]
	}
	floats.AddScaled(nm.centroid, -1/float64(dim), nm.vertices[dim])
	floats.AddScaled(nm.centroid, 1/float64(dim), x)
}

type nmSorter struct {
	vertices [][]float64
	values   []float64
}

func (n nmSorter) Len() int           { return len(n.values) }
func (n nmSorter) Less(i, j int) bool { return n.values[i] < n.values[j] }
func (n nmSorter) Swap(i, j int) {
	n.values[i], n.values[j] = n.values[j], n.values[i]
	n.vertices[i], n.vertices[j] = n.vertices[j], n.vertices[i]
}
