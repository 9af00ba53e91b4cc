package calcblock

import (
	"strings"

	"cleave/notebook/mdsrc"
)

// Sanitize turns a result text into something that can sit in a result
// region of a block fenced by fenceLen characters fence: CR and LF become
// spaces, surrounding blanks are trimmed, and in every run of fence
// characters at least fenceLen long each character is preceded by a
// backslash. A fenceLen below 3 is treated as 3.
func Sanitize(result string, fence byte, fenceLen int) string {
	fenceLen = max(fenceLen, 3)
	r := result
	if strings.ContainsAny(r, "\r\n") {
		r = lineBreaks.Replace(r)
	}
	r = strings.TrimSpace(r)
	if fence != '`' && fence != '~' || strings.IndexByte(r, fence) < 0 {
		return r
	}
	if !strings.Contains(r, strings.Repeat(string(fence), fenceLen)) {
		return r
	}
	var b strings.Builder
	for i := 0; i < len(r); {
		if r[i] != fence {
			b.WriteByte(r[i])
			i++
			continue
		}
		j := i
		for j < len(r) && r[j] == fence {
			j++
		}
		if j-i >= fenceLen {
			for k := i; k < j; k++ {
				b.WriteByte('\\')
				b.WriteByte(fence)
			}
		} else {
			b.WriteString(r[i:j])
		}
		i = j
	}
	return b.String()
}

var lineBreaks = strings.NewReplacer("\r\n", " ", "\r", " ", "\n", " ")

// edit replaces Raw[start:end] with text (an insertion when start == end).
type edit struct {
	start, end int
	text       string
}

// Rewrite returns a copy of s.Raw in which the result region of every line
// named in results (by LineNo) shows that result, sanitised with
// [Sanitize]. Read-only blocks, blank and comment lines, and lines whose
// sanitised result equals their current text are left alone. No byte
// outside the result regions changes, apart from the two spaces that
// separate a newly added region from the code. If nothing changes, the
// result equals s.Raw (it is still a copy).
func Rewrite(s *mdsrc.Source, blocks []Block, results map[int]string) []byte {
	var edits []edit
	for _, b := range blocks {
		if b.ReadOnly {
			continue
		}
		for _, l := range b.Lines {
			res, ok := results[l.LineNo]
			if !ok {
				continue
			}
			e, ok := lineEdit(l, Sanitize(res, b.Fence, b.FenceLen))
			if ok {
				edits = append(edits, e)
			}
		}
	}
	return applyEdits(s.Raw, edits)
}

// lineEdit returns the edit that makes line l show result (already
// sanitised), or false if none is needed.
func lineEdit(l Line, result string) (edit, bool) {
	if l.Kind() != Code || result == l.Old && l.HasResult() {
		return edit{}, false
	}
	region := Marker
	if result != "" {
		region += " " + result
	}
	if l.HasResult() {
		return edit{l.Result.Start, l.Result.End, region}, true
	}
	return edit{l.Span.End, l.Span.End, "  " + region}, true
}

// applyEdits applies non-overlapping edits sorted by position (Find returns
// lines in document order, so they are).
func applyEdits(raw []byte, edits []edit) []byte {
	grow := 0
	for _, e := range edits {
		grow += len(e.text) - (e.end - e.start)
	}
	out := make([]byte, 0, len(raw)+max(grow, 0))
	pos := 0
	for _, e := range edits {
		out = append(out, raw[pos:e.start]...)
		out = append(out, e.text...)
		pos = e.end
	}
	return append(out, raw[pos:]...)
}

// errorPrefix starts the result text of a failed line.
const errorPrefix = "error: "

// wasMarker separates an error message from the last good value.
const wasMarker = " (was: "

// ErrorText returns the result text for a line whose evaluation failed with
// msg, given the line's current result text old: "error: msg", followed by
// " (was: v)" when old is a good value v, or when old is an earlier error
// text that kept a good value v. The text "(was:" inside msg is written as
// "(was :" so the last good value can always be recovered.
func ErrorText(msg, old string) string {
	msg = strings.ReplaceAll(strings.TrimSpace(msg), "(was:", "(was :")
	text := errorPrefix + msg
	if good := LastGood(old); good != "" {
		text += wasMarker + good + ")"
	}
	return text
}

// LastGood returns the last good value shown by a result text: the text
// itself if it is not an error, the value kept in " (was: v)" if it is an
// error that kept one, and "" otherwise.
func LastGood(old string) string {
	if !strings.HasPrefix(old, errorPrefix) && old != strings.TrimSpace(errorPrefix) {
		return old
	}
	i := strings.Index(old, wasMarker)
	if i < 0 || !strings.HasSuffix(old, ")") {
		return ""
	}
	return old[i+len(wasMarker) : len(old)-1]
}

// IsError reports whether a result text shows a failed evaluation.
func IsError(result string) bool {
	return strings.HasPrefix(result, errorPrefix) || result == strings.TrimSpace(errorPrefix)
}
