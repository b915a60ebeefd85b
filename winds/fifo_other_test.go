//go:build !unix

package winds

import "errors"

func mkfifo(string) error { return errors.New("no FIFOs on this system") }
