package main

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestCommittedFile checks that readings.csv is what the generator writes
// with its default seed and row count, so the file and the code that
// documents it cannot drift apart.
func TestCommittedFile(t *testing.T) {
	want, err := os.ReadFile(filepath.Join("..", "readings.csv"))
	require.NoError(t, err)
	var got bytes.Buffer
	require.NoError(t, write(&got, 2000, 20261203))
	assert.True(t, bytes.Equal(want, got.Bytes()),
		"readings.csv is stale: run `go run ./examples/multilabel/gen` from the repository root")
	assert.Less(t, len(want), 300<<10, "committed data stays under 300 KB")
}

// TestDeterministic checks that a seed always gives the same rows and
// another seed other rows.
func TestDeterministic(t *testing.T) {
	var a, b, c bytes.Buffer
	require.NoError(t, write(&a, 50, 1))
	require.NoError(t, write(&b, 50, 1))
	require.NoError(t, write(&c, 50, 2))
	assert.Equal(t, a.String(), b.String())
	assert.NotEqual(t, a.String(), c.String())
}
