//go:build !long

package validate

const longSuite = false
