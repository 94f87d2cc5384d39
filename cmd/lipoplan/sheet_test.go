package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"encoding/xml"
	"errors"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"golang.org/x/net/html"

	"lipoplan/catalogue"
)

// voidElements have no end tag (HTML Living Standard, 13.1.2 Elements).
var voidElements = map[string]bool{"area": true, "base": true, "br": true, "col": true, "embed": true, "hr": true,
	"img": true, "input": true, "link": true, "meta": true, "source": true, "track": true, "wbr": true}

// checkBalanced tokenizes page with golang.org/x/net/html and checks that
// every element is closed in order, as written (the parser itself would
// repair any page): a structural check on top of html.Parse.
func checkBalanced(t *testing.T, page []byte) {
	t.Helper()
	z := html.NewTokenizer(bytes.NewReader(page))
	var open []string
	inSVG := 0
	for {
		tt := z.Next()
		if tt == html.ErrorToken {
			require.ErrorIs(t, z.Err(), io.EOF)
			break
		}
		tok := z.Token()
		switch tt {
		case html.StartTagToken:
			if tok.Data == "svg" {
				inSVG++
			}
			if inSVG == 0 && voidElements[tok.Data] {
				continue
			}
			open = append(open, tok.Data)
		case html.EndTagToken:
			require.NotEmpty(t, open, "</%s> closes nothing", tok.Data)
			require.Equal(t, open[len(open)-1], tok.Data, "</%s> closes <%s>", tok.Data, open[len(open)-1])
			open = open[:len(open)-1]
			if tok.Data == "svg" {
				inSVG--
			}
		}
	}
	assert.Empty(t, open, "elements left open")
}

// find returns the elements named tag under n, in document order.
func find(n *html.Node, tag string) []*html.Node {
	var out []*html.Node
	var walk func(*html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.ElementNode && n.Data == tag {
			out = append(out, n)
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(n)
	return out
}

// text is the text content of n.
func text(n *html.Node) string {
	var b strings.Builder
	var walk func(*html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.TextNode {
			b.WriteString(n.Data)
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(n)
	return strings.TrimSpace(b.String())
}

// tableAfter is the rows (cells' text) of the first table after the h2
// headed heading.
func tableAfter(t *testing.T, doc *html.Node, heading string) [][]string {
	t.Helper()
	for _, h := range find(doc, "h2") {
		if text(h) != heading {
			continue
		}
		for n := h.NextSibling; n != nil; n = n.NextSibling {
			if n.Type == html.ElementNode && n.Data == "table" {
				var rows [][]string
				for _, tr := range find(n, "tr") {
					var cells []string
					for _, td := range find(tr, "td") {
						cells = append(cells, text(td))
					}
					if len(cells) > 0 {
						rows = append(rows, cells)
					}
				}
				return rows
			}
		}
	}
	t.Fatalf("no table under %q", heading)
	return nil
}

// sha256sum is the coreutils sha256sum of path (FIPS 180-4), or "" when the
// program is missing.
func sha256sum(t *testing.T, path string) string {
	t.Helper()
	if _, err := exec.LookPath("sha256sum"); err != nil {
		return ""
	}
	out, err := exec.Command("sha256sum", path).Output()
	require.NoError(t, err)
	return strings.Fields(string(out))[0]
}

// The blend sheet of the demo laminating blend, written from files: the
// page parses as HTML with every element closed in order; its blend table
// holds the stocks, shares and tonnes that solve's JSON reports, and its
// cost; the properties name their methods (AOCS Cd 1c-85, Fatemi & Hammond,
// pulsed NMR per AOCS Cd 16b-93); the TAG classes are those `tags` gives
// for the same blend (native) and add to 100; the embedded chart is
// well-formed SVG; the checksums are the SHA-256 of the input files (Go's
// crypto/sha256, and coreutils sha256sum where installed); it has a print
// style for A4; and it names the date.
func TestSheetDemo(t *testing.T) {
	dir := t.TempDir()
	stocks, spec := filepath.Join(dir, "stocks.toml"), filepath.Join(dir, "laminating.toml")
	require.NoError(t, os.WriteFile(stocks, catalogue.DemoFiles()["stocks.toml"], 0o644))
	require.NoError(t, os.WriteFile(spec, catalogue.DemoFiles()["laminating.toml"], 0o644))
	sheet := filepath.Join(dir, "sheet.html")
	code, report, errs := run(t, "solve", "--stocks", stocks, "--spec", spec, "--sheet", sheet)
	require.Equal(t, 0, code, errs)
	plain := func() string { _, out, _ := run(t, "solve", "--stocks", stocks, "--spec", spec); return out }()
	assert.Equal(t, plain, report, "the report is the same with a sheet")
	page, err := os.ReadFile(sheet)
	require.NoError(t, err)
	checkBalanced(t, page)
	doc, err := html.Parse(bytes.NewReader(page))
	require.NoError(t, err)

	code, out, errs := run(t, "solve", "--stocks", stocks, "--spec", spec, "--format", "json")
	require.Equal(t, 0, code, errs)
	var js struct {
		Cost  float64 `json:"cost_per_tonne"`
		Blend []struct {
			Stock  string  `json:"stock"`
			Pct    float64 `json:"pct"`
			Tonnes float64 `json:"tonnes"`
		} `json:"blend"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &js))
	rows := tableAfter(t, doc, "Blend and lots")
	require.Len(t, rows, len(js.Blend)+1, "one row per stock and the total")
	var use []string
	for i, l := range js.Blend {
		assert.Equal(t, l.Stock, rows[i][0])
		assert.Equal(t, strconv.FormatFloat(l.Pct, 'f', 2, 64), rows[i][2], l.Stock)
		assert.Equal(t, strconv.FormatFloat(l.Tonnes, 'f', 3, 64), rows[i][3], l.Stock)
		use = append(use, l.Stock+"="+strconv.FormatFloat(l.Pct, 'f', -1, 64))
	}
	assert.Equal(t, "total", rows[len(rows)-1][0])
	assert.Equal(t, "100.00", rows[len(rows)-1][2])
	assert.Contains(t, string(page), strconv.FormatFloat(js.Cost, 'f', 2, 64)+" EUR")

	props := text(doc)
	for _, m := range []string{"AOCS Official Method Cd 1c-85", "Fatemi & Hammond (1980)", "AOCS Cd 16b-93 / ISO 8292-1", "3 × 56 106"} {
		assert.Contains(t, props, m)
	}

	code, out, errs = run(t, "tags", "--stocks", stocks, "--use", strings.Join(use, ","), "--format", "json")
	require.Equal(t, 0, code, errs)
	var tg struct {
		Classes map[string]float64 `json:"classes"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &tg))
	tags := tableAfter(t, doc, "TAG classes (mol %)")
	sum := 0.0
	for _, r := range tags {
		key := strings.Fields(r[0])[0]
		if want, ok := tg.Classes[key]; ok {
			v, err := strconv.ParseFloat(r[1], 64)
			require.NoError(t, err)
			assert.InDelta(t, want, v, 0.006, key)
			sum += v
		}
	}
	assert.InDelta(t, 100, sum, 0.03, "S3 + S2U + SU2 + U3")

	svgs := find(doc, "svg")
	require.Len(t, svgs, 1, "one chart")
	start, end := bytes.Index(page, []byte("<svg")), bytes.LastIndex(page, []byte("</svg>"))
	require.True(t, start > 0 && end > start)
	dec := xml.NewDecoder(bytes.NewReader(page[start : end+len("</svg>")]))
	for {
		_, err := dec.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		require.NoError(t, err, "the chart is well-formed XML")
	}

	sums := tableAfter(t, doc, "Inputs")
	require.Len(t, sums, 2)
	for i, path := range []string{stocks, spec} {
		b, err := os.ReadFile(path)
		require.NoError(t, err)
		h := sha256.Sum256(b)
		assert.Equal(t, path+hex.EncodeToString(h[:]), sums[i][1], "source and SHA-256 of %s", path)
		if want := sha256sum(t, path); want != "" {
			assert.Equal(t, path+want, sums[i][1], "sha256sum %s", path)
		}
	}
	css := text(find(doc, "style")[0])
	assert.Contains(t, css, "@media print")
	assert.Contains(t, css, "size: A4")
	assert.Regexp(t, `Solved \d{4}-\d\d-\d\d \d\d:\d\d UTC`, props)
	assert.Contains(t, props, "confirm by lab analysis")
}

// Without files the sheet names the embedded demo data and the checksums
// of the embedded files; every user string is escaped, so a spec or stock
// name holding markup stays text; a spec with a reactor step carries the
// plant caution and the reactor's feed; an impossible spec writes no sheet;
// a sheet over an input is refused (exit 2) and the input kept.
func TestSheetEscapesAndEdges(t *testing.T) {
	dir := t.TempDir()
	sheet := filepath.Join(dir, "demo.html")
	code, _, errs := run(t, "solve", "--sheet", sheet)
	require.Equal(t, 0, code, errs)
	page, err := os.ReadFile(sheet)
	require.NoError(t, err)
	doc, err := html.Parse(bytes.NewReader(page))
	require.NoError(t, err)
	sums := tableAfter(t, doc, "Inputs")
	h := sha256.Sum256(catalogue.DemoFiles()["stocks.toml"])
	assert.Equal(t, "embedded demo data (stocks.toml)"+hex.EncodeToString(h[:]), sums[0][1])
	assert.True(t, strings.HasPrefix(sums[1][1], "embedded demo data"))

	cat := catalogue.DemoStocks().Clone()
	for i := range cat.Stocks {
		cat.Stocks[i].Name = `<b onmouseover="x()">` + cat.Stocks[i].Name + ` & co</b>`
	}
	var b bytes.Buffer
	require.NoError(t, catalogue.WriteStocks(&b, cat))
	stocks := filepath.Join(dir, "stocks.toml")
	require.NoError(t, os.WriteFile(stocks, b.Bytes(), 0o644))
	spec := filepath.Join(dir, "spec.toml")
	body := strings.Replace(string(catalogue.DemoFiles()["laminating.toml"]), `name = "Laminating fat for puff pastry, trans-free"`, `name = "</title><script>alert(1)</script>"`, 1)
	require.NoError(t, os.WriteFile(spec, []byte(body), 0o644))
	code, _, errs = run(t, "solve", "--stocks", stocks, "--spec", spec, "--sheet", sheet)
	require.Equal(t, 0, code, errs)
	page, err = os.ReadFile(sheet)
	require.NoError(t, err)
	checkBalanced(t, page)
	doc, err = html.Parse(bytes.NewReader(page))
	require.NoError(t, err)
	assert.Empty(t, find(doc, "script"), "no script element from a spec name")
	for _, n := range find(doc, "b") {
		assert.Empty(t, n.Attr, "no b element from a stock name")
	}
	assert.Contains(t, text(doc), `</title><script>alert(1)</script>`, "the name is shown as text")
	assert.Contains(t, string(page), "&lt;b onmouseover=&#34;x()&#34;&gt;")

	proc := filepath.Join(dir, "process.html")
	code, _, errs = run(t, "solve", "--spec", filepath.Join("..", "..", "testdata", "process-margarine.toml"), "--sheet", proc)
	require.Equal(t, 0, code, errs)
	page, err = os.ReadFile(proc)
	require.NoError(t, err)
	checkBalanced(t, page)
	assert.Contains(t, string(page), "hazardous plant operations")
	assert.Contains(t, string(page), "interesterification")

	none := filepath.Join(dir, "none.html")
	code, _, _ = run(t, "solve", "--spec", filepath.Join("..", "..", "testdata", "impossible-laminating.toml"), "--sheet", none)
	assert.Equal(t, 3, code)
	assert.NoFileExists(t, none)

	before, err := os.ReadFile(spec)
	require.NoError(t, err)
	code, _, errs = run(t, "solve", "--stocks", stocks, "--spec", spec, "--sheet", spec)
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "--sheet")
	after, err := os.ReadFile(spec)
	require.NoError(t, err)
	assert.Equal(t, before, after, "the input is untouched")
}
