//go:build !linux

package hugeheap

func reserve(int) {}
