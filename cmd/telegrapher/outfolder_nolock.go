//go:build !(linux || darwin || freebsd || netbsd || openbsd || dragonfly)

package main

import "errors"

// errNoLocks: on systems without flock (outfolder_lock.go covers the unix ones) a run
// cannot mark its temporary folder as in use, so leftover folders are removed by age
// alone (leftoverAgeNoLocks, a day) rather than by the absence of a live lock.
var errNoLocks = errors.New("folder locks are not available on this system")

func lockDir(dir string) (unlock func(), err error)    { return nil, errNoLocks }
func tryLockDir(dir string) (unlock func(), err error) { return nil, errNoLocks }
