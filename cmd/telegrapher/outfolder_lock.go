//go:build linux || darwin || freebsd || netbsd || openbsd || dragonfly

package main

import (
	"errors"
	"os"
	"syscall"
)

// lockDir takes an exclusive lock (flock) on the folder dir for as long as the process
// lives or until unlock; the kernel releases it when the process ends, however it ends.
// It waits for a cleaning run that holds the lock for an instant.
func lockDir(dir string) (unlock func(), err error) {
	return flockDir(dir, syscall.LOCK_EX)
}

// tryLockDir takes the lock of lockDir without waiting: errLocked when a live process
// holds it, another error when the file system has no locks.
func tryLockDir(dir string) (unlock func(), err error) {
	return flockDir(dir, syscall.LOCK_EX|syscall.LOCK_NB)
}

func flockDir(dir string, how int) (func(), error) {
	f, err := os.Open(dir)
	if err != nil {
		return nil, err
	}
	for {
		err = syscall.Flock(int(f.Fd()), how)
		if err != syscall.EINTR {
			break
		}
	}
	if err != nil {
		f.Close()
		if errors.Is(err, syscall.EWOULDBLOCK) {
			return nil, errLocked
		}
		return nil, err
	}
	return func() { f.Close() }, nil
}
