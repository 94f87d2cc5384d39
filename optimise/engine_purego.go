//go:build !cgo || purego

package optimise

// defaultEngine is gonum's simplex: the build has no cgo or asked for purego.
func defaultEngine() engine { return gonumEngine{} }

// reusableEngine is gonum's simplex too; it keeps nothing between solves.
func reusableEngine() engine { return gonumEngine{} }
