// Package scripts_test checks scripts/go, the Makefile's Go bootstrap, the
// way a fresh Debian or Ubuntu machine meets it: with a PATH that holds no
// Go (or one too old), against a local Go module proxy serving a small
// stand-in for the golang.org/toolchain zip. The stand-in's hash comes
// from the real go command (go mod download), not from the script, so the
// script's hashing is checked against Go's own. The real download (about
// 70 MB from proxy.golang.org) is not repeated here; DEVELOPERS.md says how
// to try it.
package scripts_test

import (
	"archive/zip"
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

// tools are the commands scripts/go may run; the test's PATH holds links
// to these and nothing else.
var tools = []string{"bash", "env", "curl", "unzip", "sha256sum", "base64", "awk", "sed", "find", "sort",
	"xargs", "cut", "mktemp", "rm", "mkdir", "mv", "chmod", "dirname", "uname", "du", "cat", "grep", "tr", "head"}

// wantedRelease reads the release go.mod asks for, as scripts/go does.
func wantedRelease(t *testing.T) string {
	t.Helper()
	data, err := os.ReadFile("../go.mod")
	if err != nil {
		t.Fatal(err)
	}
	release := ""
	for _, line := range strings.Split(string(data), "\n") {
		f := strings.Fields(line)
		switch {
		case len(f) == 2 && f[0] == "toolchain":
			return f[1]
		case len(f) == 2 && f[0] == "go" && release == "":
			release = "go" + f[1]
		}
	}
	return release
}

// fakeGo is a go command that reports release and, asked anything else,
// echoes its arguments and the GOTOOLCHAIN it was given.
func fakeGo(release string) string {
	return fmt.Sprintf("#!/bin/sh\nif [ \"$1\" = version ]; then echo \"go version %s %s/%s\"; exit 0; fi\necho \"fake %s: $*\"\necho \"GOTOOLCHAIN=$GOTOOLCHAIN\"\n",
		release, runtime.GOOS, runtime.GOARCH, release)
}

// toolchainZip builds a module zip laid out like golang.org/toolchain's:
// a GOROOT under the module@version prefix, file modes not kept.
func toolchainZip(t *testing.T, prefix, goScript string) []byte {
	t.Helper()
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for name, body := range map[string]string{
		"bin/go":    goScript,
		"bin/gofmt": "#!/bin/sh\nexit 0\n",
		"pkg/tool/" + runtime.GOOS + "_" + runtime.GOARCH + "/vet": "#!/bin/sh\nexit 0\n",
		"VERSION":                strings.SplitN(goScript, "\n", 2)[0],
		"go.env":                 "GOPROXY=https://proxy.golang.org,direct\n",
		"src/builtin/builtin.go": "package builtin\n",
	} {
		w, err := zw.Create(prefix + "/" + name)
		if err != nil {
			t.Fatal(err)
		}
		w.Write([]byte(body))
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// proxy is a file:// Go module proxy in a temporary directory.
type proxy struct {
	dir     string
	module  string
	version string
}

// serve writes the toolchain zip, its .mod and .info, and a checksum
// database lookup answering sum (the real go's hash of zip unless
// overridden).
func (p proxy) serve(t *testing.T, zipData []byte, sum string) {
	t.Helper()
	at := filepath.Join(p.dir, p.module, "@v")
	must(t, os.MkdirAll(at, 0o755))
	must(t, os.WriteFile(filepath.Join(at, p.version+".zip"), zipData, 0o644))
	must(t, os.WriteFile(filepath.Join(at, p.version+".mod"), []byte("module "+p.module+"\n"), 0o644))
	must(t, os.WriteFile(filepath.Join(at, p.version+".info"), []byte(`{"Version":"`+p.version+`"}`), 0o644))
	must(t, os.WriteFile(filepath.Join(at, "list"), []byte(p.version+"\n"), 0o644))
	if sum == "" {
		sum = goModSum(t, p)
	}
	lookup := filepath.Join(p.dir, "sumdb", "sum.golang.org", "lookup", p.module+"@"+p.version)
	must(t, os.MkdirAll(filepath.Dir(lookup), 0o755))
	must(t, os.WriteFile(lookup, []byte(fmt.Sprintf("1\n%s %s %s\n\ngo.sum database tree\n", p.module, p.version, sum)), 0o644))
}

// goModSum asks the real go command for the zip's go.sum hash.
func goModSum(t *testing.T, p proxy) string {
	t.Helper()
	goBin, err := exec.LookPath("go")
	if err != nil {
		t.Skip("no go command to hash the stand-in toolchain with")
	}
	cmd := exec.Command(goBin, "mod", "download", "-json", p.module+"@"+p.version)
	cmd.Dir = t.TempDir()
	cmd.Env = append(os.Environ(), "GOPROXY=file://"+p.dir, "GOSUMDB=off", "GOFLAGS=-modcacherw",
		"GOMODCACHE="+filepath.Join(t.TempDir(), "mod"), "GOTOOLCHAIN=local", "GO111MODULE=on")
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("go mod download: %v\n%s", err, out)
	}
	var info struct{ Sum string }
	if err := json.Unmarshal(out, &info); err != nil || !strings.HasPrefix(info.Sum, "h1:") {
		t.Fatalf("go mod download -json: %v\n%s", err, out)
	}
	return info.Sum
}

func must(t *testing.T, err error) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
}

// goArchive is the platform name of the toolchain zips for this machine.
func goArchive() string {
	arch := runtime.GOARCH
	if arch == "arm" {
		arch = "armv6l"
	}
	return runtime.GOOS + "-" + arch
}

func TestBootstrap(t *testing.T) {
	if runtime.GOOS != "linux" {
		t.Skip("scripts/go installs toolchains on Linux (the fresh Debian/Ubuntu machine)")
	}
	bin := t.TempDir()
	for _, tool := range tools {
		path, err := exec.LookPath(tool)
		if err != nil {
			t.Skipf("scripts/go needs %s", tool)
		}
		must(t, os.Symlink(path, filepath.Join(bin, tool)))
	}
	script, err := filepath.Abs("go")
	must(t, err)

	release := wantedRelease(t)
	platform := goArchive()
	module, version := "golang.org/toolchain", "v0.0.1-"+release+"."+platform
	prefix := module + "@" + version
	good := toolchainZip(t, prefix, fakeGo(release))

	goodProxy := proxy{dir: t.TempDir(), module: module, version: version}
	goodProxy.serve(t, good, "")
	// The same release, one byte changed, under the good zip's hash.
	tampered := proxy{dir: t.TempDir(), module: module, version: version}
	tampered.serve(t, toolchainZip(t, prefix, fakeGo(release)+"# changed\n"), goModSum(t, goodProxy))
	damaged := proxy{dir: t.TempDir(), module: module, version: version}
	damaged.serve(t, good[:len(good)/2], "h1:unused=")
	// A zip, correctly hashed, whose go is another release.
	wrongRelease := proxy{dir: t.TempDir(), module: module, version: version}
	wrongRelease.serve(t, toolchainZip(t, prefix, fakeGo("go1.0.1")), "")

	// withGo returns a PATH directory holding the tools and a go that
	// reports release.
	withGo := func(release string) string {
		dir := t.TempDir()
		for _, tool := range tools {
			must(t, os.Symlink(filepath.Join(bin, tool), filepath.Join(dir, tool)))
		}
		must(t, os.WriteFile(filepath.Join(dir, "go"), []byte(fakeGo(release)), 0o755))
		return dir
	}

	// The Makefile's own detection: make toolchain on a PATH without Go.
	t.Run("make toolchain", func(t *testing.T) {
		makeBin, err := exec.LookPath("make")
		if err != nil {
			t.Skip("no make")
		}
		cache := t.TempDir()
		cmd := exec.Command(makeBin, "-s", "--no-print-directory", "-C", "..", "toolchain",
			"PATH="+bin, "XDG_CACHE_HOME="+cache, "GOPROXY=file://"+goodProxy.dir)
		// The outer make's variables (make test runs this) stay out.
		for _, kv := range os.Environ() {
			name, _, _ := strings.Cut(kv, "=")
			switch name {
			case "GO", "MAKEFLAGS", "MFLAGS", "MAKELEVEL", "GOFLAGS", "GOTOOLCHAIN":
				continue
			}
			cmd.Env = append(cmd.Env, kv)
		}
		cmd.Env = append(cmd.Env, "HOME="+t.TempDir(), "GOSUMDB=sum.golang.org")
		out, err := cmd.CombinedOutput()
		if err != nil || !strings.Contains(string(out), "installed go version "+release) || !strings.Contains(string(out), "go version "+release) {
			t.Errorf("make toolchain without Go: %v\n%s", err, out)
		}
	})

	for _, tc := range []struct {
		name      string
		path      string // PATH
		goproxy   string
		stdout    []string // each must appear
		stderr    []string
		fails     bool
		installed bool // the toolchain ends up in the cache
	}{
		{"no go on PATH", bin, "file://" + goodProxy.dir,
			[]string{"fake " + release + ": env GOPATH", "GOTOOLCHAIN="},
			[]string{"no go on PATH; go.mod needs " + release, "installed go version " + release, "h1:", "from file://"},
			false, true},
		{"go 1.19 on PATH (Debian 12)", withGo("go1.19.8"), "file://" + goodProxy.dir,
			[]string{"fake " + release + ": env GOPATH"},
			[]string{"is go1.19.8, older than Go 1.21", "installed go version " + release},
			false, true},
		{"go 1.22 on PATH switches by itself", withGo("go1.22.1"), "off",
			[]string{"fake go1.22.1: env GOPATH", "GOTOOLCHAIN=" + release}, nil, false, false},
		{"go new enough on PATH", withGo("go1.999.0"), "off",
			[]string{"fake go1.999.0: env GOPATH", "GOTOOLCHAIN=\n"}, nil, false, false},
		{"tampered zip", bin, "file://" + tampered.dir, nil, []string{"checksum mismatch", "not installing it"}, true, false},
		{"damaged zip", bin, "file://" + damaged.dir, nil, []string{"is damaged"}, true, false},
		{"zip of another release", bin, "file://" + wrongRelease.dir, nil, []string{`reports "go version go1.0.1`}, true, false},
		{"no proxy", bin, "off", nil, []string{"no Go module proxy in GOPROXY=off served " + prefix}, true, false},
		{"proxy without the module, then one with it", bin, "file://" + t.TempDir() + ",file://" + goodProxy.dir,
			[]string{"fake " + release}, []string{"has no " + prefix, "installed go version " + release}, false, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			cache := t.TempDir()
			run := func(goproxy string) (string, string, error) {
				cmd := exec.Command(script, "env", "GOPATH")
				cmd.Dir = t.TempDir()
				cmd.Env = []string{"PATH=" + tc.path, "HOME=" + t.TempDir(), "XDG_CACHE_HOME=" + cache,
					"GOPROXY=" + goproxy, "GOSUMDB=sum.golang.org", "TMPDIR=" + t.TempDir()}
				var stdout, stderr bytes.Buffer
				cmd.Stdout, cmd.Stderr = &stdout, &stderr
				err := cmd.Run()
				return stdout.String(), stderr.String(), err
			}
			stdout, stderr, err := run(tc.goproxy)
			if (err != nil) != tc.fails {
				t.Fatalf("scripts/go env GOPATH: error %v, want failure %v\nstdout:\n%s\nstderr:\n%s", err, tc.fails, stdout, stderr)
			}
			for _, want := range tc.stdout {
				if !strings.Contains(stdout, want) {
					t.Errorf("stdout lacks %q:\n%s", want, stdout)
				}
			}
			for _, want := range tc.stderr {
				if !strings.Contains(stderr, want) {
					t.Errorf("stderr lacks %q:\n%s", want, stderr)
				}
			}
			goroot := filepath.Join(cache, "dimerpath", release+"."+platform)
			_, statErr := os.Stat(filepath.Join(goroot, "bin", "go"))
			if installed := statErr == nil; installed != tc.installed {
				t.Errorf("toolchain installed in %s: %v, want %v", goroot, installed, tc.installed)
			}
			if !tc.installed {
				return
			}
			if fi, err := os.Stat(filepath.Join(goroot, "pkg", "tool", runtime.GOOS+"_"+runtime.GOARCH, "vet")); err != nil || fi.Mode()&0o111 == 0 {
				t.Errorf("pkg/tool's vet is not executable after the install: %v", err)
			}
			// Again, with no proxy: the cached toolchain runs, silently.
			stdout, stderr, err = run("off")
			if err != nil || !strings.Contains(stdout, "fake "+release) || stderr != "" {
				t.Errorf("second run: error %v, stdout %q, stderr %q; want the cached toolchain, nothing on stderr", err, stdout, stderr)
			}
		})
	}
}
