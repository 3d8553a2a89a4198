package analysis

import (
	"errors"
	"fmt"
	"strings"

	"github.com/telegrapher/telegrapher/waves"
)

// InputError is a problem with the study's data (or a command-line value standing for
// a study key): Error gives "FILE: key: problem". The command layer exits with status
// 2 on it.
type InputError struct {
	File string // the study file
	Key  string // the study key, e.g. "energise.time_step_us"; "" for the file as a whole
	Msg  string // the problem
}

func (e *InputError) Error() string {
	if e.Key == "" {
		return e.File + ": " + e.Msg
	}
	return e.File + ": " + e.Key + ": " + e.Msg
}

// IsInputError reports whether err is or wraps an *InputError or a *MethodError.
func IsInputError(err error) bool {
	var ie *InputError
	var me *MethodError
	return errors.As(err, &ie) || errors.As(err, &me)
}

// inputf returns an *InputError about key of file.
func inputf(file, key, format string, a ...any) *InputError {
	return &InputError{File: file, Key: key, Msg: fmt.Sprintf(format, a...)}
}

// Command names the study table whose settings a library call was given, for the
// setting-to-key table.
type Command string

const (
	CmdEnergise  Command = "energise"
	CmdSwitching Command = "switching"
)

// settingKeys maps the settings of the library packages (the Setting of a
// waves.SettingError) to the study keys they come from, per command: the one place
// where a library field meets a study key. A setting missing here is reported on the
// command's table ("switching").
var settingKeys = map[Command]map[string]string{
	CmdEnergise: {
		"TimeStep":  "energise.time_step_us",
		"Duration":  "energise.duration_ms",
		"TrappedPU": "energise.trapped_pu",
		"CloseDeg":  "energise.close_deg",
	},
	CmdSwitching: {
		"Shots":           "switching.shots",
		"CloseDeg":        "switching.close_deg",
		"PoleSigma":       "switching.pole_sigma_ms",
		"Preinsertion":    "switching.preinsertion_ohm",
		"InsertTime":      "switching.preinsertion_ms",
		"Duration":        "switching.duration_ms",
		"TimeStep":        "switching.time_step_us",
		"DeadTime":        "switching.dead_time_ms",
		"ControlledSigma": "switching.controlled_sigma_ms",
		"TrappedPU":       "switching.trapped_pu",
		"NeutralL[0]":     "switching.neutral_reactor_sending_ohm",
		"NeutralL[1]":     "switching.neutral_reactor_receiving_ohm",
		"Arresters":       "switching.arrester",
	},
}

// SettingKey returns the study key of a library setting for cmd, and whether the
// table has it (else the key is the command's table).
func SettingKey(cmd Command, setting string) (string, bool) {
	k, ok := settingKeys[cmd][setting]
	if !ok {
		return string(cmd), false
	}
	return k, true
}

// settingInput turns an error wrapping sentinel (waves.ErrSettings, waves.ErrSwitching)
// into an *InputError naming the study key of its setting (a waves.SettingError) or
// the command's table; the key replaces the sentinel's text at the start of the
// message. Other errors come back unchanged.
func settingInput(file string, cmd Command, err, sentinel error) error {
	if !errors.Is(err, sentinel) {
		return err
	}
	key := string(cmd)
	var se *waves.SettingError
	if errors.As(err, &se) {
		key, _ = SettingKey(cmd, se.Setting)
	}
	return &InputError{File: file, Key: key, Msg: strings.TrimPrefix(err.Error(), sentinel.Error()+": ")}
}

// noConvergence turns an error of arrester currents that do not converge
// (waves.ErrNoConvergence, in a shot or in the dead time) into an *InputError naming
// switching.arrester: the arresters' V-I tables are the data to check. Other errors
// come back unchanged.
func noConvergence(file string, err error) error {
	if !errors.Is(err, waves.ErrNoConvergence) {
		return err
	}
	return inputf(file, "switching.arrester", "%v", err)
}
