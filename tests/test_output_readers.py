"""Independent readers of a crustforge run file: h5py for the HDF5 layout and values, a plain
XML parse plus h5py for the XDMF sidecar, and h5dump -H as a smoke check.

meshio (7.0 here) cannot read the sidecar: its XDMF reader wants a Topology with a DataItem and
XY/XYZ geometry, not the 2DRectMesh/VXVY rectilinear grid, so the XDMF check is done by hand.

Usage: test_output_readers.py WRITE_SAMPLE_RUN   (the driver built from write_sample_run.c)
Environment (from ctest): CF_MPIEXEC, CF_TEST_TMP.
Expected values: half-space cooling T = Ts + (Tp - Ts) erf(z / (2 sqrt(kappa x / U0)))
(Turcotte & Schubert, Geodynamics, 2nd ed., sections 4.15-4.17) and corner flow
u = (2 U0 / pi) (atan(x/z) - x z / r^2) (Batchelor 1967; Reid & Jackson 1981), recomputed here
from the scenario stored in the file: derived values, 1e-12 relative (common practice, no source).
"""
import math
import os
import shutil
import subprocess
import sys
import tempfile
import xml.etree.ElementTree as ET

import h5py
import numpy as np

SECONDS_PER_YEAR = 3.15576e7  # Julian year (IAU)
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def text(v):
    return v.decode() if isinstance(v, bytes) else str(v)


def run(driver, ranks, args, expect=0):
    mpiexec = os.environ.get("CF_MPIEXEC", "mpiexec")
    cmd = [mpiexec, "-n", str(ranks), "--bind-to", "none", driver] + args
    p = subprocess.run(cmd, capture_output=True, text=True, timeout=120)
    if p.returncode != expect:
        print(p.stdout, p.stderr)
    check(p.returncode == expect, f"{' '.join(args)} on {ranks} ranks: exit {p.returncode}, expected {expect}")
    return p


def check_hdf5(path):
    with h5py.File(path, "r") as f:
        root = f.attrs
        check(text(root.get("format", "")) == "crustforge-run", "root attribute format")
        check(int(root.get("format_version", 0)) == 1, "root attribute format_version")
        for name in ("crustforge_version", "crustforge_revision", "petsc_version", "hdf5_version", "created"):
            check(len(text(root.get(name, ""))) > 0, f"root attribute {name}")
        check(text(root["hdf5_version"]) == "%d.%d.%d" % h5py.version.hdf5_version_tuple, "hdf5_version matches the library")
        check(int(root["nonlinear_iterations"]) == 7 and float(root["residual_norm"]) == 3.25e-11, "run figures")
        sc, units = f["scenario"].attrs, f["scenario/units"].attrs
        check(text(units["mantle.potential_temperature"]) == "C", "scenario unit of mantle.potential_temperature")
        check(float(sc["mantle.potential_temperature"]) == 1380.0, "scenario mantle.potential_temperature")
        check(text(sc["melting.model"]) == "katz2003", "scenario melting.model")

        x, z = f["x"][()], f["z"][()]
        nx, nz = len(x), len(z)
        check((nx, nz) == (24, 12), f"grid {nx} x {nz}")
        check(text(f["x"].attrs["units"]) == "km" and text(f["z"].attrs["units"]) == "km", "coordinate units km")
        check(text(f["z"].attrs["positive"]) == "down", "z positive down")
        check(np.allclose(x, (np.arange(nx) + 0.5) * 2.0, rtol=1e-15), "x at cell centres")

        # Scenario values (user units) to SI, as the key table documents them.
        tp = float(sc["mantle.potential_temperature"]) + 273.15
        ts = float(sc["surface.temperature"]) + 273.15
        kappa = float(sc["mantle.conductivity"]) / (float(sc["mantle.density"]) * float(sc["mantle.heat_capacity"]))
        u0 = 0.5 * float(sc["ridge.full_spreading_rate"]) * 1e-3 / SECONDS_PER_YEAR
        X, Z = np.meshgrid(x * 1e3, z * 1e3)  # [nz][nx], x fastest
        erf = np.vectorize(math.erf)
        t_expect = ts + (tp - ts) * erf(Z / (2 * np.sqrt(kappa * X / u0))) - 273.15
        u_expect = 2 * u0 / math.pi * (np.arctan(X / Z) - X * Z / (X**2 + Z**2)) * 1e3 * SECONDS_PER_YEAR

        for name, units, expect in (("temperature", "degC", t_expect), ("velocity_x", "mm/yr", u_expect)):
            d = f[name]
            check(d.shape == (nz, nx), f"{name} shape {d.shape}")
            check(text(d.attrs["units"]) == units, f"{name} units")
            check(len(text(d.attrs["long_name"])) > 0, f"{name} long_name")
            err = np.max(np.abs(d[()] - expect) / np.abs(expect))
            check(err <= 1e-12, f"{name} values: max relative error {err:g}")
        return {k: f[k][()] for k in ("x", "z", "temperature", "velocity_x")}


def check_xdmf(xdmf, h5name):
    root = ET.parse(xdmf).getroot()
    check(root.tag == "Xdmf" and root.get("Version", "").startswith("3"), "Xdmf Version 3")
    grid = root.find("Domain/Grid")
    topo, geom = grid.find("Topology"), grid.find("Geometry")
    check(topo.get("TopologyType") == "2DRectMesh" and topo.get("Dimensions") == "12 24", "2DRectMesh 12 x 24")
    check(geom.get("GeometryType") == "VXVY" and len(geom.findall("DataItem")) == 2, "VXVY geometry")
    items = geom.findall("DataItem") + [a.find("DataItem") for a in grid.findall("Attribute")]
    names = sorted(a.get("Name") for a in grid.findall("Attribute"))
    check(names == ["temperature", "velocity_x"], f"attributes {names}")
    for item in items:
        ref = item.text.strip()
        fname, dset = ref.split(":", 1)
        check(fname == h5name and not os.path.isabs(fname), f"relative path in {ref}")
        h5path = os.path.join(os.path.dirname(xdmf), fname)
        with h5py.File(h5path, "r") as f:
            check(dset in f, f"{ref}: dataset exists")
            dims = tuple(int(n) for n in item.get("Dimensions").split())
            check(dset in f and f[dset].shape == dims, f"{ref}: dimensions {dims}")
            check(item.get("Format") == "HDF" and item.get("Precision") == "8" and f[dset].dtype == np.float64, f"{ref}: 8-byte floats")


def main():
    driver = sys.argv[1]
    base = os.environ.get("CF_TEST_TMP") or tempfile.gettempdir()
    os.makedirs(base, exist_ok=True)
    work = tempfile.mkdtemp(prefix="output_readers_", dir=base)
    try:
        fields = {}
        for ranks in (1, 2):
            d = os.path.join(work, f"np{ranks}")
            os.makedirs(d)
            h5 = os.path.join(d, "run.h5")
            run(driver, ranks, ["write", h5])
            check(sorted(os.listdir(d)) == ["run.h5", "run.xdmf"], f"np{ranks}: files {sorted(os.listdir(d))}")
            fields[ranks] = check_hdf5(h5)
            check_xdmf(os.path.join(d, "run.xdmf"), "run.h5")
            p = subprocess.run(["h5dump", "-H", h5], capture_output=True, text=True)
            check(p.returncode == 0 and 'DATASET "temperature"' in p.stdout and "( 12, 24 )" in p.stdout, "h5dump -H lists temperature [12][24]")
        for k in fields[1]:  # pointwise fields: bit-for-bit the same from 1 and 2 ranks
            check(np.array_equal(fields[1][k], fields[2][k]), f"{k}: 1 and 2 ranks differ")

        d = os.path.join(work, "failed")
        os.makedirs(d)
        run(driver, 2, ["write", os.path.join(d, "run.h5"), "--fail"])
        check(os.listdir(d) == [], f"failed run left {os.listdir(d)}")

        d = os.path.join(work, "killed")
        os.makedirs(d)
        p = subprocess.run([os.environ.get("CF_MPIEXEC", "mpiexec"), "-n", "1", "--bind-to", "none", driver, "write", os.path.join(d, "run.h5"), "--kill"], capture_output=True, text=True, timeout=120)
        check(p.returncode != 0, "killed run exits non-zero")
        left = sorted(os.listdir(d))
        check("run.h5" not in left and "run.xdmf" not in left, f"killed run left {left}")
        for name in left:  # whatever is left is refused by the module's reader
            r = run(driver, 1, ["read", os.path.join(d, name)], expect=2)
            check("incomplete" in r.stderr or "damaged" in r.stderr, f"{name}: reader says {r.stderr.strip()}")
    finally:
        shutil.rmtree(work, ignore_errors=True)
    print("%d failures" % len(failures))
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
