package study

// Tower geometry: [conductors.NAME] and [line.geometry] (or a section's geometry) into
// a propagation.Geometry whose positive- and zero-sequence constants become the line's.

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/telegrapher/telegrapher/propagation"
)

// Keys of the study file for the geometry, as the contract writes them.
var (
	conductorKeys = tableKeys("conductors.NAME")
	geometryKeys  = tableKeys("line.geometry")
	wireKeys      = tableKeys("line.geometry.phases")

	// GeometryExclusiveKeys are the per-length constants of a line (or section) that a
	// geometry replaces; giving both is an error.
	GeometryExclusiveKeys = []string{
		"r_ohm_per_km", "l_mh_per_km", "x_ohm_per_km", "c_nf_per_km", "b_us_per_km", "g_us_per_km",
		"r0_ohm_per_km", "l0_mh_per_km", "x0_ohm_per_km", "c0_nf_per_km", "b0_us_per_km", "g0_us_per_km",
	}
)

// Bounds of the geometry's keys, from the schema (values outside are typing errors
// rather than towers).
var (
	diameterBounds    = lookup("conductors.NAME.outer_diameter_mm").Bounds
	dcBounds          = lookup("conductors.NAME.dc_ohm_per_km").Bounds
	resistivityBounds = lookup("line.geometry.earth_resistivity_ohm_m").Bounds
	heightBounds      = lookup("line.geometry.phases.height_m").Bounds
	xBounds           = lookup("line.geometry.phases.x_m").Bounds
	bundleBounds      = lookup("line.geometry.phases.bundle").Bounds
	spacingBounds     = lookup("line.geometry.phases.bundle_spacing_mm").Bounds
)

// geoErrorf returns the input error `FILE: key.path: problem`.
func geoErrorf(file, path, format string, a ...any) error {
	return &Error{File: file, Key: path, Msg: fmt.Sprintf(format, a...)}
}

// conductors reads [conductors.NAME] (before [line]) and returns the conductor types
// for the geometries; nil when the table is absent or has a problem (recorded).
func (ld *Loader) conductors(t *Table) map[string]propagation.Conductor {
	if !t.Present() {
		return nil
	}
	conds, entries, err := ParseConductors(ld.File, t.Map())
	if err != nil {
		ld.Fail(t.Path(), err)
		return nil
	}
	for _, e := range entries {
		ld.Note(e.Key, e.Value, e.How)
	}
	return conds
}

// geometry reads [line.geometry] or a section's geometry (sub, in the section's table)
// against the conductor types conds and returns the section's positive- and
// zero-sequence constants from the tower.
func (ld *Loader) geometry(section, sub *Table, conds map[string]propagation.Conductor) (pos, zero propagation.Constants, err error) {
	if !sub.Present() {
		return nil, nil, geoErrorf(ld.File, sub.Path(), "must be a table [%s]", sub.Path())
	}
	g, entries, err := ParseGeometry(ld.File, sub.Path(), sub.Map(), section.Map(), conds, ld.Study.Frequency)
	if err != nil {
		return nil, nil, err
	}
	for _, e := range entries {
		ld.Note(e.Key, e.Value, e.How)
	}
	return g.Positive(), g.Zero(), nil
}

// ParseConductors reads the [conductors] table: NAME -> {outer_diameter_mm,
// core_diameter_mm, dc_ohm_per_km}. tbl is the decoded TOML table (nil when absent).
func ParseConductors(file string, tbl map[string]any) (map[string]propagation.Conductor, []Entry, error) {
	out := map[string]propagation.Conductor{}
	var entries []Entry
	for _, name := range sortedKeys(tbl) {
		path := "conductors." + name
		t, ok := tbl[name].(map[string]any)
		if !ok {
			return nil, nil, geoErrorf(file, path, "must be a table [%s] of outer_diameter_mm, core_diameter_mm, dc_ohm_per_km", path)
		}
		if err := geoUnknown(file, path, t, conductorKeys); err != nil {
			return nil, nil, err
		}
		outer, err := geoNumber(file, path, t, "outer_diameter_mm", true, 0)
		if err != nil {
			return nil, nil, err
		}
		if !(outer > 0) || outer > diameterBounds.Hi {
			return nil, nil, geoErrorf(file, path+".outer_diameter_mm", "must be > 0 and at most %g, got %g", diameterBounds.Hi, outer)
		}
		if outer < diameterBounds.Lo {
			return nil, nil, geoErrorf(file, path+".outer_diameter_mm", "must be between %g and %g, got %g", diameterBounds.Lo, diameterBounds.Hi, outer)
		}
		core, err := geoNumber(file, path, t, "core_diameter_mm", false, 0)
		if err != nil {
			return nil, nil, err
		}
		if !(core >= 0) || core >= outer {
			return nil, nil, geoErrorf(file, path+".core_diameter_mm", "must be >= 0 and less than outer_diameter_mm (%g), got %g", outer, core)
		}
		if core > maxCoreRatio*outer {
			return nil, nil, geoErrorf(file, path+".core_diameter_mm", "must be at most %g x outer_diameter_mm (%g), got %g", maxCoreRatio, maxCoreRatio*outer, core)
		}
		rdc, err := geoNumber(file, path, t, "dc_ohm_per_km", true, 0)
		if err != nil {
			return nil, nil, err
		}
		if !(rdc > 0) || rdc > dcBounds.Hi {
			return nil, nil, geoErrorf(file, path+".dc_ohm_per_km", "must be > 0 and at most %g, got %g", dcBounds.Hi, rdc)
		}
		if rdc < dcBounds.Lo {
			return nil, nil, geoErrorf(file, path+".dc_ohm_per_km", "must be between %g and %g, got %g", dcBounds.Lo, dcBounds.Hi, rdc)
		}
		c, err := propagation.NewConductor(outer/1000, core/1000, rdc/1000)
		if err != nil {
			return nil, nil, geoErrorf(file, path, "%v", err)
		}
		out[name] = c
		kind := "solid"
		if core > 0 {
			kind = fmt.Sprintf("tube, core %g mm", core)
		}
		entries = append(entries, Entry{Key: path, Value: fmt.Sprintf("%g mm (%s), %g ohm/km d.c., resistivity %.4g ohm·m", outer, kind, rdc, c.Resistivity), How: "given"})
	}
	return out, entries, nil
}

// ParseGeometry reads a geometry table (path "line.geometry", or a section's) against
// the conductors of ParseConductors and returns the tower as a propagation.Geometry,
// with what it understood. lineTbl is the table holding the geometry ([line] or the
// section), checked for per-length constants that the geometry excludes; frequency
// (Hz) is the system frequency for the derived constants listed in the entries.
func ParseGeometry(file, path string, tbl map[string]any, lineTbl map[string]any, conductors map[string]propagation.Conductor, frequency float64) (*propagation.Geometry, []Entry, error) {
	parent := strings.TrimSuffix(path, ".geometry")
	for _, k := range GeometryExclusiveKeys {
		if _, ok := lineTbl[k]; ok {
			return nil, nil, geoErrorf(file, parent+"."+k, "the per-length constants and %s exclude each other; give one or the other", path)
		}
	}
	if err := geoUnknown(file, path, tbl, geometryKeys); err != nil {
		return nil, nil, err
	}
	rho, err := geoNumber(file, path, tbl, "earth_resistivity_ohm_m", true, 0)
	if err != nil {
		return nil, nil, err
	}
	if !(rho >= resistivityBounds.Lo) || rho > resistivityBounds.Hi {
		return nil, nil, geoErrorf(file, path+".earth_resistivity_ohm_m", "must be between %g and %g, got %g", resistivityBounds.Lo, resistivityBounds.Hi, rho)
	}
	transposed := true
	if v, ok := tbl["transposed"]; ok {
		b, ok := v.(bool)
		if !ok {
			return nil, nil, geoErrorf(file, path+".transposed", "must be true or false, got %v", v)
		}
		transposed = b
	}
	var entries []Entry
	entries = append(entries, Entry{Key: path + ".earth_resistivity_ohm_m", Value: fmt.Sprintf("%g ohm·m", rho), How: "given"})
	how := "given"
	if _, ok := tbl["transposed"]; !ok {
		how = "default"
	}
	entries = append(entries, Entry{Key: path + ".transposed", Value: fmt.Sprint(transposed), How: how})

	phasesRaw, ok := tbl["phases"]
	if !ok {
		return nil, nil, geoErrorf(file, path+".phases", "missing: give the three phases, e.g. phases = [{ x_m = -10, height_m = 20, conductor = \"main\" }, ...]")
	}
	phases, pe, err := geoWires(file, path+".phases", phasesRaw, conductors)
	if err != nil {
		return nil, nil, err
	}
	if len(phases) != 3 {
		return nil, nil, geoErrorf(file, path+".phases", "a single circuit needs exactly 3 phases, got %d", len(phases))
	}
	entries = append(entries, pe...)
	var earth []propagation.Wire
	if raw, ok := tbl["earth_wires"]; ok {
		ew, ee, err := geoWires(file, path+".earth_wires", raw, conductors)
		if err != nil {
			return nil, nil, err
		}
		if len(ew) > maxEarthWires {
			return nil, nil, geoErrorf(file, path+".earth_wires", "at most %d earth wires, got %d", maxEarthWires, len(ew))
		}
		earth = ew
		entries = append(entries, ee...)
	}
	g, err := propagation.NewGeometry(phases, earth, rho, transposed)
	if err != nil {
		return nil, nil, geoErrorf(file, path, "%s", strings.TrimPrefix(err.Error(), "propagation: "))
	}
	if frequency > 0 {
		w := 2 * math.Pi * frequency
		z1, y1, z0, y0 := g.Sequence(complex(0, w))
		for _, q := range []struct {
			name string
			z, y complex128
		}{{"positive", z1, y1}, {"zero", z0, y0}} {
			entries = append(entries, Entry{
				Key: parent + " (" + q.name + " sequence)",
				Value: fmt.Sprintf("r %.5g ohm/km, l %.5g mH/km, c %.5g nF/km at %g Hz",
					real(q.z)*1e3, imag(q.z)/w*1e6, imag(q.y)/w*1e12, frequency),
				How: "from the geometry (frequency dependent)",
			})
		}
	}
	return g, entries, nil
}

// geoWires reads an array of wire tables.
func geoWires(file, path string, raw any, conductors map[string]propagation.Conductor) ([]propagation.Wire, []Entry, error) {
	var items []map[string]any
	switch v := raw.(type) {
	case []map[string]any:
		items = v
	case []any:
		for i, e := range v {
			m, ok := e.(map[string]any)
			if !ok {
				return nil, nil, geoErrorf(file, fmt.Sprintf("%s[%d]", path, i), "must be a table { x_m = ..., height_m = ..., conductor = \"...\" }")
			}
			items = append(items, m)
		}
	default:
		return nil, nil, geoErrorf(file, path, "must be an array of tables [{ x_m = ..., height_m = ..., conductor = \"...\" }, ...]")
	}
	var wires []propagation.Wire
	var entries []Entry
	for i, t := range items {
		p := fmt.Sprintf("%s[%d]", path, i)
		if err := geoUnknown(file, p, t, wireKeys); err != nil {
			return nil, nil, err
		}
		x, err := geoNumber(file, p, t, "x_m", true, 0)
		if err != nil {
			return nil, nil, err
		}
		if !(x >= xBounds.Lo && x <= xBounds.Hi) {
			return nil, nil, geoErrorf(file, p+".x_m", "must be within ±%g m, got %g", xBounds.Hi, x)
		}
		h, err := geoNumber(file, p, t, "height_m", true, 0)
		if err != nil {
			return nil, nil, err
		}
		if !(h > 0) || h > heightBounds.Hi {
			return nil, nil, geoErrorf(file, p+".height_m", "must be > 0 and at most %g m, got %g", heightBounds.Hi, h)
		}
		if h < heightBounds.Lo {
			return nil, nil, geoErrorf(file, p+".height_m", "must be between %g and %g m, got %g", heightBounds.Lo, heightBounds.Hi, h)
		}
		sag, err := geoNumber(file, p, t, "sag_m", false, 0)
		if err != nil {
			return nil, nil, err
		}
		if !(sag >= 0) || sag >= h {
			return nil, nil, geoErrorf(file, p+".sag_m", "must be >= 0 and less than height_m (%g m), got %g", h, sag)
		}
		cv, ok := t["conductor"]
		if !ok {
			return nil, nil, geoErrorf(file, p+".conductor", "missing: name a [conductors.NAME] table%s", geoNames(conductors))
		}
		cname, ok := cv.(string)
		if !ok {
			return nil, nil, geoErrorf(file, p+".conductor", "must be the name of a [conductors.NAME] table, got %v", cv)
		}
		cond, ok := conductors[cname]
		if !ok {
			return nil, nil, geoErrorf(file, p+".conductor", "no [conductors.%s] table%s", cname, DidYouMean(cname, sortedConductors(conductors)))
		}
		bundle := 1
		if bv, ok := t["bundle"]; ok {
			n, isInt := bv.(int64)
			if !isInt {
				return nil, nil, geoErrorf(file, p+".bundle", "must be a whole number of subconductors, got %v", bv)
			}
			if float64(n) < bundleBounds.Lo || float64(n) > bundleBounds.Hi {
				return nil, nil, geoErrorf(file, p+".bundle", "must be %g to %g, got %d", bundleBounds.Lo, bundleBounds.Hi, n)
			}
			bundle = int(n)
		}
		spacing, err := geoNumber(file, p, t, "bundle_spacing_mm", false, 0)
		if err != nil {
			return nil, nil, err
		}
		switch {
		case bundle > 1 && !(spacing > 2000*cond.OuterRadius && spacing <= spacingBounds.Hi):
			return nil, nil, geoErrorf(file, p+".bundle_spacing_mm", "a bundle of %d needs a spacing above the conductor diameter (%g mm) and at most %g mm, got %g", bundle, 2000*cond.OuterRadius, spacingBounds.Hi, spacing)
		case bundle == 1 && spacing != 0:
			return nil, nil, geoErrorf(file, p+".bundle_spacing_mm", "only with bundle > 1 (bundle is 1), got %g", spacing)
		}
		w := propagation.Wire{X: x, Height: h, Sag: sag, Conductor: cond, Bundle: bundle, Spacing: spacing / 1000}
		wires = append(wires, w)
		desc := fmt.Sprintf("x %g m, height %g m, sag %g m (mean height %.4g m), %s", x, h, sag, w.MeanHeight(), cname)
		if bundle > 1 {
			desc += fmt.Sprintf(", bundle of %d at %g mm (equivalent radius %.4g mm)", bundle, spacing, 1000*w.EquivalentRadius())
		}
		entries = append(entries, Entry{Key: p, Value: desc, How: "given"})
	}
	return wires, entries, nil
}

// geoNumber reads t[key] as a finite number (integer or float); absent gives def, or
// an error when required.
func geoNumber(file, path string, t map[string]any, key string, required bool, def float64) (float64, error) {
	v, ok := t[key]
	if !ok {
		if required {
			return 0, geoErrorf(file, path+"."+key, "missing")
		}
		return def, nil
	}
	var f float64
	switch n := v.(type) {
	case int64:
		f = float64(n)
	case float64:
		f = n
	case int:
		f = float64(n)
	default:
		return 0, geoErrorf(file, path+"."+key, "must be a number, got %v", v)
	}
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return 0, geoErrorf(file, path+"."+key, "must be finite, got %v", v)
	}
	return f, nil
}

// geoUnknown refuses keys of t that are not in known, in the style of Table.Known.
func geoUnknown(file, path string, t map[string]any, known []string) error {
	for _, k := range sortedKeys(t) {
		if !contains(known, k) {
			return geoErrorf(file, path+"."+k, "unknown key%s; known here: %s", geoSuggest(k, known), strings.Join(known, ", "))
		}
	}
	return nil
}

// geoSuggest is didYouMean, and also suggests the key with its unit when only the
// unit suffix is missing (earth_resistivity for earth_resistivity_ohm_m).
func geoSuggest(k string, known []string) string {
	for _, c := range known {
		if strings.HasPrefix(c, k+"_") {
			return fmt.Sprintf(" (did you mean %q?)", c)
		}
	}
	return DidYouMean(k, known)
}

func geoNames(conductors map[string]propagation.Conductor) string {
	names := sortedConductors(conductors)
	if len(names) == 0 {
		return " (the file has no [conductors.NAME] table)"
	}
	return " (defined: " + strings.Join(names, ", ") + ")"
}

func sortedKeys(t map[string]any) []string { return orderedKeys(t) }

func sortedConductors(m map[string]propagation.Conductor) []string {
	ks := make([]string, 0, len(m))
	for k := range m {
		ks = append(ks, k)
	}
	sort.Strings(ks)
	return ks
}
