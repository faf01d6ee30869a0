package shard

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"math"
	"strings"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/material"
)

// hashFormat changes whenever what Hash covers changes.
const hashFormat = 1

// Hash returns the fingerprint of a computation: the job's content (every
// decoded key, but not where the file lies or its line numbers), every
// body's mesh as placed and refined (vertex coordinates and triangles, bit
// for bit) and material, the resolved sweep, the settings that change the
// numbers (accuracy, temperature, length unit, forces and stiffness, dense
// or compressed interaction blocks, substrate) and the fluctus version.
// Two runs with the same fingerprint compute the same units. Threads,
// progress and the shard spec are not part of it.
func Hash(scene *job.Scene, set scatter.Settings, version string) (string, error) {
	canon, err := canonicalJob(scene.Job)
	if err != nil {
		return "", err
	}
	type body struct {
		Name     string
		Material string
		Mesh     string
	}
	fp := struct {
		Format   int
		Version  string
		Job      any
		Bodies   []body
		Sweep    scatter.Sweep
		Settings struct {
			Accuracy, ThermalWavenumber, Length float64
			Forces, Stiffness, Dense            bool
			Substrate                           *scatter.Plane
		}
	}{Format: hashFormat, Version: version, Job: canon, Sweep: scene.Sweep}
	for _, b := range scene.Bodies {
		fp.Bodies = append(fp.Bodies, body{Name: b.Name, Material: materialPrint(b.Material), Mesh: meshHash(b.Mesh)})
	}
	fp.Settings.Accuracy = set.Accuracy
	fp.Settings.ThermalWavenumber = set.ThermalWavenumber
	fp.Settings.Length = set.Length
	fp.Settings.Forces, fp.Settings.Stiffness, fp.Settings.Dense = set.Forces, set.Stiffness, set.Dense
	fp.Settings.Substrate = set.Substrate
	data, err := json.Marshal(fp) // floats as shortest round-trip decimals: exact
	if err != nil {
		return "", fmt.Errorf("fingerprint of the job: %w", err)
	}
	sum := sha256.Sum256(data)
	return hex.EncodeToString(sum[:]), nil
}

// materialPrint describes a material model by its type, name and its
// permittivity ε(iξ) (IEEE bits) at ξ = 0 and at ξ = 10^(k/2) rad/s for
// k = 20..38 (ξ from 1e10 to 1e19 rad/s, past every optical resonance):
// models that agree there give the same numbers for every practical length
// unit, whatever their inner layout.
func materialPrint(m material.Model) string {
	if m == nil {
		return "perfect conductor"
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%T %q", m, m.Name())
	xis := []float64{0}
	for k := 20; k <= 38; k++ {
		xis = append(xis, math.Pow(10, float64(k)/2))
	}
	for _, xi := range xis {
		fmt.Fprintf(&b, " %x", math.Float64bits(m.Epsilon(xi)))
	}
	return b.String()
}

// meshHash returns the SHA-256 of a mesh's vertex coordinates (IEEE bits)
// and triangle indices.
func meshHash(m *mesh.Mesh) string {
	h := sha256.New()
	var buf [8]byte
	put := func(u uint64) {
		binary.LittleEndian.PutUint64(buf[:], u)
		h.Write(buf[:])
	}
	put(uint64(len(m.Vertices)))
	for _, v := range m.Vertices {
		put(math.Float64bits(v.X))
		put(math.Float64bits(v.Y))
		put(math.Float64bits(v.Z))
	}
	put(uint64(len(m.Triangles)))
	for _, t := range m.Triangles {
		for _, k := range t {
			put(uint64(int64(k)))
		}
	}
	return hex.EncodeToString(h.Sum(nil))
}

// canonicalJob returns the job's content as a generic JSON value without
// the keys that only say where the job file is (its path, directory and
// name, the resolved paths of mesh files, whose content the mesh hashes
// cover) or where a key stands in it (line numbers).
func canonicalJob(j *job.Job) (any, error) {
	data, err := json.Marshal(j)
	if err != nil {
		return nil, fmt.Errorf("fingerprint of the job: %w", err)
	}
	var v any
	if err := json.Unmarshal(data, &v); err != nil {
		return nil, fmt.Errorf("fingerprint of the job: %w", err)
	}
	top := v.(map[string]any)
	for _, k := range []string{"Path", "Dir", "Name"} {
		delete(top, k)
	}
	if bodies, ok := top["Bodies"].([]any); ok {
		for _, b := range bodies {
			if m, ok := b.(map[string]any); ok {
				delete(m, "File")
			}
		}
	}
	stripLines(v)
	return v, nil
}

// stripLines removes the line-number keys at every depth.
func stripLines(v any) {
	switch x := v.(type) {
	case map[string]any:
		for k, e := range x {
			switch {
			case k == "Line" || k == "Lines" || strings.HasSuffix(k, "Line"):
				delete(x, k)
			default:
				stripLines(e)
			}
		}
	case []any:
		for _, e := range x {
			stripLines(e)
		}
	}
}
