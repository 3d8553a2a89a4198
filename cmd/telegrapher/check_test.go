package main

import (
	"strings"
	"testing"
)

// The hostile battery: each file must give exit status 2, a message naming the file
// and the key (or line), and nothing on standard output.
func TestHostileStudies(t *testing.T) {
	t.Parallel()
	line := func(extra string) string { return fndStudy + extra }
	set := func(key, val string) string {
		var out []string
		for _, l := range strings.Split(fndStudy, "\n") {
			if strings.HasPrefix(l, key+" ") {
				if val == "" {
					continue
				}
				l = key + " = " + val
			}
			out = append(out, l)
		}
		return strings.Join(out, "\n")
	}
	cases := []struct{ name, src, want string }{
		{"length string", set("length_km", `"320"`), "line.length_km: must be a number"},
		{"voltage bool", set("voltage_kv", "true"), "voltage_kv: must be a number"},
		{"frequency array", set("frequency_hz", "[50]"), "frequency_hz: must be a number"},
		{"title number", set("title", "3"), "title: must be a string"},
		{"nan resistance", set("r_ohm_per_km", "nan"), "line.r_ohm_per_km: must be a finite number"},
		{"inf length", set("length_km", "inf"), "line.length_km: must be a finite number"},
		{"neg inf frequency", set("frequency_hz", "-inf"), "frequency_hz: must be a finite number"},
		{"negative length", set("length_km", "-3"), "line.length_km: must be > 0, got -3"},
		{"zero frequency", set("frequency_hz", "0"), "frequency_hz: must be > 0"},
		{"negative voltage", set("voltage_kv", "-1"), "voltage_kv: must be > 0"},
		{"negative r", set("r_ohm_per_km", "-0.1"), "line.r_ohm_per_km: must be >= 0"},
		{"negative g", line("g_us_per_km = -2\n"), "line.g_us_per_km: must be >= 0"},
		{"zero l", set("l_mh_per_km", "0"), "line.l_mh_per_km: must be > 0"},
		{"l and x", line("x_ohm_per_km = 0.3\n"), "line.x_ohm_per_km: line.l_mh_per_km and line.x_ohm_per_km are alternatives"},
		{"c and b", line("b_us_per_km = 3.9\n"), "line.b_us_per_km:"},
		{"l0 and x0", line("r0_ohm_per_km = 0.2\nl0_mh_per_km = 3\nx0_ohm_per_km = 1\nc0_nf_per_km = 7\n"), "line.x0_ohm_per_km:"},
		{"missing frequency", set("frequency_hz", ""), "frequency_hz: missing"},
		{"missing length", set("length_km", ""), "line.length_km: missing"},
		{"missing r", set("r_ohm_per_km", ""), "line.r_ohm_per_km: missing"},
		{"missing c", set("c_nf_per_km", ""), "line.c_nf_per_km: missing"},
		{"missing c0", line("r0_ohm_per_km = 0.2\nl0_mh_per_km = 3\n"), "line.c0_nf_per_km: missing"},
		{"typo hint", strings.Replace(fndStudy, "length_km", "lenght_km", 1), `line.lenght_km: unknown key (did you mean "length_km"?)`},
		{"unknown table", line("[remedies]\nx = 1\n"), "remedies: unknown key"},
		{"source both forms", line("[source]\nshort_circuit_mva = 1e4\nx_over_r = 10\nr_ohm = 1\nl_mh = 3\n"), "source.r_ohm: the source is given two ways"},
		{"source x_over_r zero", line("[source]\nshort_circuit_mva = 1e4\nx_over_r = 0\n"), "source.x_over_r: must be > 0"},
		{"shunt at", line("[[shunt]]\nat = \"far\"\nconnection = \"line\"\nmvar = 100\n"), "shunt[0].at: must be"},
		{"shunt q", line("[[shunt]]\nat = \"sending\"\nconnection = \"line\"\nmvar = 100\nq_factor = -1\n"), "shunt[0].q_factor: must be > 0"},
		{"scan points cap", line("[scan]\npoints = 1000001\n"), "scan.points: must be between 2 and 1e+06"},
		{"scan sc range", line("[scan]\nshort_circuit_mva_range = [0, 100]\n"), "scan.short_circuit_mva_range:"},
		{"samples cap", line("[energise]\nduration_ms = 1000\ntime_step_us = 0.01\n"), "energise.time_step_us: gives"},
		{"energise method", line("[energise]\nmethod = \"lattise\"\n"), `energise.method: must be "lattice" or "bergeron" or "laplace", got "lattise" (did you mean "lattice"?)`},
		{"syntax error", "frequency_hz = 50\nvoltage_kv = 400\n[line]\nlength_km = 3 3\n", "line 4: syntax error"},
		{"empty file", "", "the study file is empty"},
		{"comments only", "# nothing here\n", "empty"},
		{"too large", fndStudy + "# " + strings.Repeat("x", 1<<20) + "\n", "larger than"},
		{"sections plus keys", "frequency_hz = 50\nvoltage_kv = 400\n[line]\nr_ohm_per_km = 1\n[[line.sections]]\nlength_km = 1\n", "line.r_ohm_per_km: with [[line.sections]]"},
	}
	if len(cases) < 30 {
		t.Fatalf("battery has %d files, want at least 30", len(cases))
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			p := fndWrite(t, "hostile.toml", c.src)
			for _, cmd := range []string{"check", "constants"} {
				code, out, errOut := fndRun(cmd, p)
				if code != 2 || out != "" {
					t.Errorf("%s: exit %d, stdout %q", cmd, code, out)
				}
				if !strings.HasPrefix(errOut, p+": ") || !strings.Contains(errOut, c.want) {
					t.Errorf("%s: stderr %q, want %q after the file name", cmd, errOut, c.want)
				}
			}
		})
	}
	code, out, errOut := fndRun("check", "/nonexistent/dir/study.toml")
	if code != 2 || out != "" || !strings.Contains(errOut, "/nonexistent/dir/study.toml: cannot read the study file") {
		t.Errorf("missing file: exit %d, stderr %q", code, errOut)
	}
}
