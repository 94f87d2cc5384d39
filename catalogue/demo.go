package catalogue

import (
	"embed"
	"fmt"
	"io/fs"
)

// demoFS holds the demo data of the invented plant Northmere Fats: a stock
// catalogue and product specs. It is read-only.
//
//go:embed demo/*.toml
var demoFS embed.FS

// DemoSpecIDs lists the demo specs in the order DemoSpecs returns them.
func DemoSpecIDs() []string { return []string{"laminating", "shortening"} }

// DemoFiles returns the raw embedded demo files by file name
// ("stocks.toml", "laminating.toml", ...), for showing or saving.
func DemoFiles() map[string][]byte {
	out := map[string][]byte{}
	entries, err := fs.ReadDir(demoFS, "demo")
	if err != nil {
		panic(fmt.Sprintf("catalogue: embedded demo data unreadable: %v", err))
	}
	for _, e := range entries {
		data, err := demoFS.ReadFile("demo/" + e.Name())
		if err != nil {
			panic(fmt.Sprintf("catalogue: embedded demo file %s unreadable: %v", e.Name(), err))
		}
		out[e.Name()] = data
	}
	return out
}

func demoFile(name string) []byte {
	data, err := demoFS.ReadFile("demo/" + name)
	if err != nil {
		panic(fmt.Sprintf("catalogue: embedded demo file %s missing: %v", name, err))
	}
	return data
}

// DemoStocks parses the embedded demo catalogue. Each call returns a fresh
// copy. It panics only if the embedded file itself is broken, which
// TestDemo guards against.
func DemoStocks() *Catalogue {
	cat, ps := ParseStocks("stocks.toml", demoFile("stocks.toml"))
	if cat == nil || len(ps) > 0 {
		panic(fmt.Sprintf("catalogue: embedded demo stocks.toml is broken:\n%v", ps))
	}
	return cat
}

// DemoSpecs parses every embedded demo spec, checked against DemoStocks.
func DemoSpecs() []*Spec {
	cat := DemoStocks()
	var out []*Spec
	for _, id := range DemoSpecIDs() {
		s, ps := ParseSpec(id+".toml", demoFile(id+".toml"), cat)
		if s == nil || len(ps) > 0 {
			panic(fmt.Sprintf("catalogue: embedded demo %s.toml is broken:\n%v", id, ps))
		}
		out = append(out, s)
	}
	return out
}

// DemoSpec returns the demo spec with the given short id ("laminating",
// "shortening").
func DemoSpec(id string) (*Spec, bool) {
	for _, s := range DemoSpecs() {
		if s.ID == id {
			return s, true
		}
	}
	return nil, false
}
