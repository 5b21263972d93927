package nn

import (
	"bufio"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/require"

	"github.com/seine-ml/seine/spec"
)

// crashEnv, when set in the environment, makes TestSaveKilled act as the
// child: it saves models over the path in the variable until it is killed.
const crashEnv = "SEINE_SAVE_CRASH_PATH"

// crashModel returns model v (0 or 1) of the crash test: a 100-150-150-3
// net of 38,253 params, a model file of about 400 KB, so that a save (with
// its fsync) takes long enough for kills to land inside it.
func crashModel(t testing.TB, v int) *Model {
	s := testSpec(100, []int{150, 150}, spec.Tanh, outSoftmax)
	s.Init.Seed = uint64(10 + v)
	net, err := Compile(s)
	require.NoError(t, err)
	m, err := NewModel(s, net.NewParams(), nil, nil)
	require.NoError(t, err)
	m.summary.Iterations = v
	return m
}

// TestSaveKilled kills a process with SIGKILL while it saves model files
// over one path, about 20 times at seeded random moments, and checks after
// each kill that the path loads as a whole model, the old one or the new
// one, never a partial one. Temporary files left by the killed saves are
// counted; they must not stop the next Load or Save.
func TestSaveKilled(t *testing.T) {
	if path := os.Getenv(crashEnv); path != "" {
		saveLoop(t, path)
		return
	}
	if runtime.GOOS == "windows" || runtime.GOOS == "plan9" {
		t.Skip("needs SIGKILL")
	}
	if testing.Short() {
		t.Skip("starts 20 processes")
	}
	models := [2]*Model{crashModel(t, 0), crashModel(t, 1)}
	dir := t.TempDir()
	path := filepath.Join(dir, "m.seine.json")
	start := time.Now()
	require.NoError(t, models[0].Save(path))
	save := time.Since(start)

	rng := rand.New(rand.NewPCG(7, 7))
	const kills = 20
	temps := 0
	var loaded [2]int
	for k := range kills {
		cmd := exec.Command(os.Args[0], "-test.run=^TestSaveKilled$", "-test.count=1")
		cmd.Env = append(os.Environ(), crashEnv+"="+path)
		out, err := cmd.StdoutPipe()
		require.NoError(t, err)
		require.NoError(t, cmd.Start())
		// Wait until the child is saving, then let it run for 0 to 3 times
		// the time of one save (a few ms; more under -race), so the kills
		// land at every stage of a save (writing, syncing, renaming), in the
		// first save or a later one.
		line, err := bufio.NewReader(out).ReadString('\n')
		started := err == nil && strings.HasPrefix(line, "saving")
		if !started {
			cmd.Process.Kill()
			cmd.Wait()
		}
		require.True(t, started, "child did not start saving: %q, %v", line, err)
		time.Sleep(time.Duration(rng.Int64N(int64(3*save) + 1)))
		require.NoError(t, cmd.Process.Signal(syscall.SIGKILL))
		err = cmd.Wait()
		ws, ok := cmd.ProcessState.Sys().(syscall.WaitStatus)
		require.True(t, ok && ws.Signaled() && ws.Signal() == syscall.SIGKILL, "kill %d: child ended by %v, not by SIGKILL", k, err)

		m, err := Load(path)
		require.NoError(t, err, "kill %d: the model file no longer loads", k)
		v := m.summary.Iterations
		require.True(t, v == 0 || v == 1, "kill %d: unknown model %d", k, v)
		loaded[v]++
		for i := range m.params {
			require.Equal(t, math.Float64bits(models[v].params[i]), math.Float64bits(m.params[i]), "kill %d: param %d differs from model %d's", k, i, v)
		}
		left, err := filepath.Glob(filepath.Join(dir, ".m.seine.json.tmp-*"))
		require.NoError(t, err)
		if len(left) > temps {
			temps = len(left)
		}
	}
	// Temporary files of killed saves remain (Save cannot clean up after
	// SIGKILL); a later Save must still work beside them.
	require.NoError(t, models[1].Save(path))
	m, err := Load(path)
	require.NoError(t, err)
	require.Equal(t, 1, m.summary.Iterations)
	t.Logf("%d kills; %d left a temporary file (killed mid-save); the path held model 0 %d times, model 1 %d times", kills, temps, loaded[0], loaded[1])
	// A kill outside a save leaves no temporary file; if none did, the test
	// never interrupted a save and proved nothing.
	require.Positive(t, temps, "no kill landed inside a save")
}

// saveLoop is the child: it saves the two crash models over path in turn
// until killed, announcing on stdout when it starts. It gives up after 20 s
// in case the parent is gone.
func saveLoop(t *testing.T, path string) {
	models := [2]*Model{crashModel(t, 0), crashModel(t, 1)}
	fmt.Println("saving")
	deadline := time.Now().Add(20 * time.Second)
	for i := 1; time.Now().Before(deadline); i++ {
		if err := models[i%2].Save(path); err != nil {
			t.Fatal(err)
		}
	}
}
