package optimise

// solStatus is an engine's verdict on one model.
type solStatus int

const (
	solOptimal solStatus = iota
	solInfeasible
	solUnbounded
)

// varState is the basis status of a column or a row logical.
type varState int8

const (
	stBasic varState = iota
	stLower          // nonbasic at its lower bound
	stUpper          // nonbasic at its upper bound
	stFixed          // nonbasic with lower = upper
	stFree           // nonbasic free variable at zero
)

// solution is what an engine returns for one model.
//
// Signs follow the usual minimisation convention shared by CLP: y[i] is
// d(objective)/d(bound) of the bound row i sits at, and the reduced cost of
// column j is d[j] = obj[j] - Σ_i y[i]·A[i][j]. A row's logical (its activity
// r = A x as a variable with bounds rowLo..rowUp) has reduced cost y[i].
type solution struct {
	status solStatus
	obj    float64
	x      []float64 // column values
	act    []float64 // row activities A x
	y      []float64 // row duals; nil for a MILP answer
	d      []float64 // reduced costs; nil for a MILP answer
	// basis holds nCols column states then nRows row-logical states of an
	// optimal basis; nil when the engine has none (MILP).
	basis []varState
}

// engine solves models. Implementations are chosen by build tags: COIN-OR
// CLP/CBC through optimise/coin when cgo is available (and the purego tag is
// not set), gonum's simplex otherwise. defaultEngine makes one that holds
// nothing between calls; reusableEngine one that keeps its working memory
// (a CLP model) from one solve to the next until close.
type engine interface {
	name() string
	milpName() string
	// solveLP solves m ignoring m.integer.
	solveLP(m *model) (*solution, error)
	// solveMILP solves m honouring m.integer.
	solveMILP(m *model) (*solution, error)
	// close frees what the engine keeps; the engine is not used after.
	close()
}

// newSolution allocates an optimal LP answer for nCols columns and nRows
// rows: the four value vectors share one allocation.
func newSolution(nCols, nRows int) *solution {
	v := make([]float64, 2*nCols+2*nRows)
	return &solution{
		status: solOptimal,
		x:      v[:nCols:nCols],
		d:      v[nCols : 2*nCols : 2*nCols],
		act:    v[2*nCols : 2*nCols+nRows : 2*nCols+nRows],
		y:      v[2*nCols+nRows:],
		basis:  make([]varState, nCols+nRows),
	}
}
