package study

import (
	"fmt"
	"sort"
	"strings"
)

// harmonicList writes a table of values by harmonic order for `check`, in the order of
// the harmonics: "h5 1.5 %, h7 1 %".
func harmonicList(m map[int]float64, unit string) string {
	hs := make([]int, 0, len(m))
	for h := range m {
		hs = append(hs, h)
	}
	sort.Ints(hs)
	parts := make([]string, len(hs))
	for i, h := range hs {
		parts[i] = fmt.Sprintf("h%d %g %s", h, m[h], unit)
	}
	return strings.Join(parts, ", ")
}
