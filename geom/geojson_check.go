package geom

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
)

// lineOf returns the 1-based line of byte offset off in b.
func lineOf(b []byte, off int64) int {
	off = max(0, min(off, int64(len(b))))
	return bytes.Count(b[:off], []byte{'\n'}) + 1
}

// checkGeoJSONSyntax walks the JSON tokens of b (RFC 8259) and reports,
// by line and byte offset, a syntax error, input that ends inside an
// object or array, or a coordinate that is not a number (RFC 7946 §3.1.1:
// a position is an array of numbers), naming the key path of the value.
func checkGeoJSONSyntax(b []byte) error {
	dec := json.NewDecoder(bytes.NewReader(b))
	var stack []jsonFrame
	path := func() string {
		var sb strings.Builder
		for _, f := range stack {
			if f.array {
				sb.WriteString("[" + strconv.Itoa(f.index) + "]")
			} else if f.key != "" {
				if sb.Len() > 0 {
					sb.WriteByte('.')
				}
				sb.WriteString(f.key)
			}
		}
		return sb.String()
	}
	inCoords := func() bool {
		for _, f := range stack {
			if !f.array && f.key == "coordinates" {
				return true
			}
		}
		return false
	}
	for {
		before := dec.InputOffset()
		tok, err := dec.Token()
		if errors.Is(err, io.EOF) {
			if len(stack) > 0 {
				return unclosed(b, len(stack))
			}
			return nil
		}
		if err != nil {
			var se *json.SyntaxError
			if errors.As(err, &se) {
				return fmt.Errorf("line %d (byte %d): not valid JSON: %s", lineOf(b, se.Offset), se.Offset, se.Error())
			}
			if errors.Is(err, io.ErrUnexpectedEOF) {
				return unclosed(b, len(stack))
			}
			return fmt.Errorf("line %d (byte %d): not valid JSON: %v", lineOf(b, dec.InputOffset()), dec.InputOffset(), err)
		}
		// the value starts after the separators that precede it
		start := before
		for start < int64(len(b)) && strings.IndexByte(" \t\r\n,:", b[start]) >= 0 {
			start++
		}
		var top *jsonFrame
		if len(stack) > 0 {
			top = &stack[len(stack)-1]
		}
		if top != nil && !top.array && top.want {
			if k, ok := tok.(string); ok {
				top.key, top.want = k, false
				continue
			}
		}
		if d, ok := tok.(json.Delim); ok {
			switch d {
			case '{', '[':
				stack = append(stack, jsonFrame{array: d == '[', want: d == '{'})
			default:
				stack = stack[:len(stack)-1]
				if len(stack) > 0 {
					stack[len(stack)-1].endValue()
				}
			}
			continue
		}
		if inCoords() {
			if _, isNum := tok.(float64); !isNum {
				return fmt.Errorf("line %d (byte %d): %s is %s; a coordinate must be a number", lineOf(b, start), start, path(), jsonKind(tok))
			}
		}
		if top != nil {
			top.endValue()
		}
	}
}

// jsonFrame is one open object or array of checkGeoJSONSyntax.
type jsonFrame struct {
	array bool
	key   string // object: the last key read
	index int    // array: the next element's index
	want  bool   // object: the next string token is a key
}

// endValue records that a value of the frame has been read.
func (f *jsonFrame) endValue() {
	if f.array {
		f.index++
	} else {
		f.want = true
	}
}

// unclosed reports input that ends with n objects or arrays still open.
func unclosed(b []byte, n int) error {
	end := bytes.TrimRight(b, " \t\r\n")
	return fmt.Errorf("line %d: the input ends with %d object(s) or array(s) still open (a missing '}' or ']')", lineOf(b, int64(len(end))), n)
}

// jsonKind names the JSON type of a token.
func jsonKind(tok json.Token) string {
	switch v := tok.(type) {
	case string:
		if len(v) > 20 {
			v = v[:20] + "…"
		}
		return "the string " + strconv.Quote(v)
	case bool:
		return "the boolean " + strconv.FormatBool(v)
	case nil:
		return "null"
	}
	return fmt.Sprint(tok)
}
