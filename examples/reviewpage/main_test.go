package main

import (
	"context"
	"encoding/xml"
	"errors"
	"io"
	"os"
	"strings"
	"testing"
)

// TestWrite checks the page without a browser: it is written, it is
// well-formed, and every product group has a row and a section, the
// group with no recorded sales among them with its reason.
func TestWrite(t *testing.T) {
	path, err := write(context.Background(), t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	d := xml.NewDecoder(f)
	rows, sections := 0, 0
	var text strings.Builder
	for {
		tok, err := d.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("%s is not well-formed: %v", path, err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			for _, a := range el.Attr {
				switch {
				case el.Name.Local == "tr" && a.Name.Local == "data-flags":
					rows++
				case el.Name.Local == "section" && a.Name.Local == "class" && a.Value == "series":
					sections++
				}
			}
		case xml.CharData:
			text.Write(el)
		}
	}
	if rows != len(lines) || sections != len(lines) {
		t.Errorf("%d rows and %d sections for %d product groups", rows, sections, len(lines))
	}
	for _, l := range lines {
		if !strings.Contains(text.String(), l.key) {
			t.Errorf("the page does not name %q", l.key)
		}
	}
	if !strings.Contains(text.String(), "all observations missing") {
		t.Error("the reason gift wrap failed is not on the page")
	}
}
