//go:build !coin

package optimise

// defaultEngine is lipoplan's own simplex, with its branch and bound for
// the integer rules: pure Go, the engine of every default build.
func defaultEngine() *engine { return simplexEngine() }

// reusableEngine is the engine a Solver keeps between solves; the LP
// engines it holds warm-start from their last basis.
func reusableEngine() *engine { return simplexEngine() }

// engineInfo names the engines of this build for lipoplan --version.
func engineInfo() string {
	return "lipoplan-simplex (lipoplan's own dual and primal simplex, pure Go); integer rules: lipoplan-bb (branch and bound)"
}
