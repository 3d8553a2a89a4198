//go:build !(linux || darwin || freebsd || netbsd || openbsd || dragonfly)

package main

import "errors"

// errNoLocks: folder locks are not implemented on this system; leftover folders are
// then removed by age alone (leftoverAgeNoLocks).
var errNoLocks = errors.New("folder locks are not available on this system")

func lockDir(dir string) (unlock func(), err error)    { return nil, errNoLocks }
func tryLockDir(dir string) (unlock func(), err error) { return nil, errNoLocks }
