// Package lint holds checks of the source tree that go vet does not make:
// see its tests.
package lint
