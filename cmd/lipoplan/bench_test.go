package main

import (
	"bytes"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"testing"
	"time"

	"lipoplan/catalogue"
	"lipoplan/optimise"
)

// stocks300 writes a catalogue of 300 stocks into dir: the demo stocks and
// seeded variants of them (price within ±10 %, SFC curve scaled by 0.9 to
// 1), synthetic data for timing only, and the demo laminating spec.
func stocks300(tb testing.TB, dir string) (stocks, spec string) {
	demo := catalogue.DemoStocks()
	cat := demo.Clone()
	r := rand.New(rand.NewPCG(300, 1))
	for k := 0; len(cat.Stocks) < 300; k++ {
		s := demo.Stocks[k%len(demo.Stocks)]
		s.ID = fmt.Sprintf("%s-v%03d", s.ID, k)
		s.Name = "variant of " + s.Name
		s.Price *= 0.9 + 0.2*r.Float64()
		fa := map[string]float64{}
		for key, v := range s.FattyAcids {
			fa[key] = v
		}
		s.FattyAcids = fa
		sfc := append(catalogue.Curve(nil), s.SFC...)
		f := 0.9 + 0.1*r.Float64()
		for i := range sfc {
			sfc[i].Solid *= f
		}
		s.SFC = sfc
		cat.Stocks = append(cat.Stocks, s)
	}
	var b bytes.Buffer
	if err := catalogue.WriteStocks(&b, cat); err != nil {
		tb.Fatal(err)
	}
	stocks, spec = filepath.Join(dir, "stocks300.toml"), filepath.Join(dir, "laminating.toml")
	if err := os.WriteFile(stocks, b.Bytes(), 0o644); err != nil {
		tb.Fatal(err)
	}
	if err := os.WriteFile(spec, catalogue.DemoFiles()["laminating.toml"], 0o644); err != nil {
		tb.Fatal(err)
	}
	return stocks, spec
}

// BenchmarkSolve300 is lipoplan solve on a 300-stock catalogue (the demo
// laminating spec) as a whole process, built once from this source
// (Process), against GLPK's glpsol reading and solving the same model from
// the MPS file lipoplan writes (Glpsol; skipped without glpsol), and the
// two in turn in every iteration with their ratio as the metric
// lipoplan/glpsol (Interleaved), and the binary's start-up alone (Startup:
// lipoplan --version). In process: the catalogue loader alone (LoadStocks,
// TOML decoding and validation), the solve alone (Solve), and the whole
// solve command (Command), also in turn with glpsol (CommandVsGlpsol,
// command/glpsol).
func BenchmarkSolve300(b *testing.B) {
	dir := b.TempDir()
	stocks, spec := stocks300(b, dir)
	cat, ps := catalogue.LoadStocks(stocks)
	if len(ps.Errors()) > 0 {
		b.Fatal(ps)
	}
	sp, ps := catalogue.LoadSpec(spec, cat)
	if len(ps.Errors()) > 0 {
		b.Fatal(ps)
	}
	b.Run("LoadStocks", func(b *testing.B) {
		for b.Loop() {
			if _, ps := catalogue.LoadStocks(stocks); len(ps.Errors()) > 0 {
				b.Fatal(ps)
			}
		}
	})
	b.Run("Solve", func(b *testing.B) {
		for b.Loop() {
			if r, err := optimise.Solve(cat, sp, optimise.Options{}); err != nil || r.Status != optimise.Optimal {
				b.Fatal(err)
			}
		}
	})
	// The whole solve command in this process (both files read and
	// checked, the solve, the JSON report): Process without the binary's
	// start-up and exit, though warm where a fresh process is cold.
	command := func() {
		a := &app{stdout: io.Discard, stderr: io.Discard}
		if err := a.solve([]string{"--stocks", stocks, "--spec", spec, "--format", "json"}); err != nil {
			b.Fatal(err)
		}
	}
	b.Run("Command", func(b *testing.B) {
		for b.Loop() {
			command()
		}
	})
	bin := filepath.Join(dir, "lipoplan")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		b.Skipf("cannot build lipoplan: %v\n%s", err, out)
	}
	mps := filepath.Join(dir, "model.mps")
	if out, err := exec.Command(bin, "solve", "--stocks", stocks, "--spec", spec, "--mps", mps).CombinedOutput(); err != nil {
		b.Fatalf("%v\n%s", err, out)
	}
	lipoplan := func() {
		c := exec.Command(bin, "solve", "--stocks", stocks, "--spec", spec, "--format", "json")
		c.Stdout = io.Discard
		if err := c.Run(); err != nil {
			b.Fatal(err)
		}
	}
	glpsol := func() {
		if out, err := exec.Command("glpsol", "--freemps", mps, "-o", mps+".out").CombinedOutput(); err != nil {
			b.Fatalf("%v\n%s", err, out)
		}
	}
	b.Run("Process", func(b *testing.B) {
		for b.Loop() {
			lipoplan()
		}
	})
	// The floor under Process: the same binary starting, printing its
	// version and exiting (every package's start-up: the SSH server, the
	// terminal UI, the plotting library's fonts).
	b.Run("Startup", func(b *testing.B) {
		for b.Loop() {
			if err := exec.Command(bin, "--version").Run(); err != nil {
				b.Fatal(err)
			}
		}
	})
	_, err := exec.LookPath("glpsol")
	b.Run("Glpsol", func(b *testing.B) {
		if err != nil {
			b.Skip("glpsol (glpk-utils) is not on PATH")
		}
		for b.Loop() {
			glpsol()
		}
	})
	// lipoplan's whole process and, without its start-up, the command in
	// this process, each in turn with glpsol's whole process
	inTurn(b, "Interleaved", "lipoplan/glpsol", lipoplan, glpsol, err)
	inTurn(b, "CommandVsGlpsol", "command/glpsol", command, glpsol, err)
}

// inTurn runs ours and theirs one after the other in every iteration of
// the sub-benchmark name and reports the ratio of their times as unit;
// skipped when theirs is missing (missing is the error looking it up).
func inTurn(b *testing.B, name, unit string, ours, theirs func(), missing error) {
	b.Run(name, func(b *testing.B) {
		if missing != nil {
			b.Skip("glpsol (glpk-utils) is not on PATH")
		}
		var tOurs, tTheirs time.Duration
		for b.Loop() {
			t0 := time.Now()
			ours()
			t1 := time.Now()
			theirs()
			tOurs, tTheirs = tOurs+t1.Sub(t0), tTheirs+time.Since(t1)
		}
		b.ReportMetric(float64(tOurs)/float64(tTheirs), unit)
	})
}
