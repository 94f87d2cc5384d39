package catalogue

import (
	"fmt"
	"path/filepath"
	"strings"

	"github.com/BurntSushi/toml"
)

// The orders file of a multi-product plan (orders.toml; README, "File
// formats"): its types, decoding and checks.

// Order is one line of a multi-product plan.
type Order struct {
	Spec   *Spec
	Path   string
	Tonnes float64
}

// Orders is a loaded orders file.
type Orders struct {
	File     string
	Orders   []Order
	Purchase map[string]float64 // price per tonne for buying beyond `available`
}

type rawOrder struct {
	Spec   val `toml:"spec"`
	Tonnes val `toml:"tonnes"`
}

type rawOrders struct {
	Order    []rawOrder `toml:"order"`
	Purchase leafMap    `toml:"purchase"`
}

// Known keys of the orders file's fixed tables, in the order the messages list them.
var (
	keysOrdersTop = []string{"order", "purchase"}
	keysOrder     = []string{"spec", "tonnes"}
)

// LoadOrders reads an orders file for a multi-product plan: [[order]] tables
// with spec (a path, relative to the orders file unless absolute) and tonnes,
// and an optional [purchase] table of prices for buying beyond `available`.
// Each spec is loaded and checked against cat; its problems are reported
// under its own file name.
func LoadOrders(path string, cat *Catalogue) (*Orders, Problems) {
	data, err := ReadInput(path)
	if err != nil {
		return nil, readProblem(path, err, "orders file")
	}
	return ParseOrders(path, data, filepath.Dir(path), cat)
}

// ParseOrders is LoadOrders on bytes already read; spec paths are resolved
// against dir.
func ParseOrders(name string, data []byte, dir string, cat *Catalogue) (*Orders, Problems) {
	c := &collector{file: name}
	var raw rawOrders
	md, ok := c.decode(data, &raw)
	if !ok {
		return nil, c.problems()
	}
	tableOf, _ := arrayTables(md, "order")
	c.unknownKeys(md,
		func(parent toml.Key) ([]string, bool) {
			switch {
			case len(parent) == 0:
				return keysOrdersTop, true
			case len(parent) == 1 && parent[0] == "order":
				return keysOrder, true
			}
			return nil, false
		},
		func(i int, k toml.Key) string {
			if k[0] != "order" || len(k) == 1 {
				return ""
			}
			n := max(tableOf(i), 0)
			return fmt.Sprintf("order #%d", n+1)
		})
	out := c.orders(raw, dir, cat)
	if c.failed() {
		return nil, c.problems()
	}
	out.File = name
	return out, c.problems()
}

// orders converts and checks a decoded orders file, loading each spec.
func (c *collector) orders(raw rawOrders, dir string, cat *Catalogue) *Orders {
	out := &Orders{}
	if len(raw.Order) == 0 {
		c.errf("", "no orders: add at least one [[order]] table with spec = \"file.toml\" and tonnes")
	}
	specs := map[string]*Spec{} // by path
	for i, ro := range raw.Order {
		where := fmt.Sprintf("order #%d", i+1)
		var o Order
		good := true
		if !ro.Tonnes.set {
			c.errf(where, "tonnes is missing; add tonnes = <amount to make>")
			good = false
		} else if t, ok := c.num(where, "tonnes", ro.Tonnes); !ok {
			good = false
		} else if !c.magnitude(where, QtyTonnes, "tonnes", t, "give the tonnes to make") {
			good = false
		} else {
			o.Tonnes = t
		}
		if !ro.Spec.set {
			c.errf(where, `spec is missing; add spec = "path/to/spec.toml" (relative to this file)`)
			continue
		}
		p, ok := c.str(where, "spec", ro.Spec)
		if !ok {
			continue
		}
		if strings.TrimSpace(p) == "" {
			c.errf(where, "spec is empty; give the path of a spec file")
			continue
		}
		if !filepath.IsAbs(p) {
			p = filepath.Join(dir, p)
		}
		// each spec file is read once, however many orders name it, and its
		// problems are reported under the first of them
		spec, seen := specs[p]
		if !seen {
			var ps Problems
			spec, ps = LoadSpec(p, cat)
			specs[p] = spec
			for _, sp := range ps {
				// say which line of the orders file led to the spec file
				sp.Msg += fmt.Sprintf(" (spec of %s in %s)", where, c.file)
				c.add(sp)
			}
		}
		if spec == nil || !good {
			continue
		}
		if seen {
			spec = spec.Clone()
		}
		o.Spec, o.Path = spec, p
		out.Orders = append(out.Orders, o)
	}
	if raw.Purchase.set {
		if raw.Purchase.m == nil {
			c.errf("[purchase]", "purchase must be a table of prices by stock id, e.g. [purchase] then \"pko-r\" = 1350.0")
		} else {
			out.Purchase = map[string]float64{}
			for _, id := range sortedKeys(raw.Purchase.m) {
				where := fmt.Sprintf("purchase %q", id)
				v, ok := c.num(where, "price", val{v: raw.Purchase.m[id], set: true})
				if !ok {
					continue
				}
				if !c.magnitude(where, QtyPrice, "price", v, "") {
					continue
				}
				if cat != nil {
					if _, found := cat.Find(id); !found {
						c.errf(where, "no stock %q in %s; %s", id, catName(cat), c.stockHint(id, cat))
						continue
					}
				}
				out.Purchase[id] = v
			}
		}
	}
	return out
}
