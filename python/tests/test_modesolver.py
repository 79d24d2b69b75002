"""Tests of the modesolver Python package (python3 -m unittest discover -s python/tests).

They need libmodesolver.so: set MODESOLVER_LIB to its path, or publish it into python/modesolver/lib. The test
suite of the repository (dotnet test ModeSolver.sln) publishes the library and runs these.
"""

import os
import subprocess
import sys
import tempfile
import unittest
import zipfile

import numpy as np

PYTHON_DIR = os.path.abspath(os.path.join(os.path.dirname(__file__), ".."))
REPO = os.path.dirname(PYTHON_DIR)
sys.path.insert(0, PYTHON_DIR)

import modesolver  # noqa: E402

DEMO = os.path.join(REPO, "runs", "plateau-demo.toml")
BAD = os.path.join(REPO, "tests", "bad-inputs", "decks")

SMALL = """
[model]
catalogue = "starobinsky"
[pivot]
efolds = 55
[modes]
k_min = 1e-4
k_max = 1.0
count = 12
"""


class RunTests(unittest.TestCase):
    def test_version_is_dotted(self):
        parts = modesolver.version().split(".")
        self.assertGreaterEqual(len(parts), 3, modesolver.version())
        self.assertTrue(all(p.split("-")[0].isdigit() for p in parts[:3]))

    def test_deck_file_and_deck_text_agree(self):
        with open(DEMO, encoding="utf-8") as f:
            text = f.read()
        with modesolver.Run(DEMO) as a, modesolver.Run(text=text, source_name=DEMO) as b:
            self.assertEqual(a.pivot(), b.pivot())

    def test_pivot_only_and_spectrum_give_the_same_pivot(self):
        with modesolver.Run(text=SMALL) as run:
            p = run.pivot()
            s = run.spectrum()
        for name in ("A_s", "n_s", "r", "alpha_s", "n_t", "N_star"):
            self.assertEqual(p[name], s[name], name)
        self.assertIsInstance(p["n_s"], float)

    def test_errors_and_tolerance_met(self):
        with modesolver.Run(text=SMALL, threads=1) as run:
            p = run.pivot()
            pe, pmet = run.errors(), run.tolerance_met
            run.spectrum()
            se, smet = run.errors(), run.tolerance_met
        self.assertEqual(tuple(pe), modesolver.ERROR_NAMES)
        # Both runs solve the same exact pivot mode, so the estimates agree exactly.
        self.assertEqual(pe, se)
        for name, err in pe.items():
            self.assertTrue(np.isfinite(err) and err > 0, f"{name}: {err}")
        # An absolute error of A_s far below A_s, of n_s far below 1 - n_s (the deck's tolerance is the default 1e-5).
        self.assertLess(pe["A_s"] / p["A_s"], 1e-4)
        self.assertLess(pe["n_s"], 1e-3 * (1 - p["n_s"]))
        self.assertTrue(pmet and smet)
        # A tolerance tighter than the modes reach: tolerance_met false, and the spectrum run warns.
        with modesolver.Run(text=SMALL, threads=1, tolerance=1e-12, count=4) as run:
            run.pivot()
            self.assertGreater(run.max_rel_error, 1e-12)
            self.assertFalse(run.tolerance_met)
            run.spectrum()
            self.assertFalse(run.tolerance_met)
            self.assertTrue(any("tolerance_met: false" in w for w in run.warnings), run.warnings)

    def test_formula_model_equals_the_catalogue_model(self):
        # The plateau demo's own commented line writes the e-model out: the same potential by formula and by id.
        formula = "V0 * (1 - exp(-sqrt(2 / (3 * alpha)) * phi))^2"
        with modesolver.Run(DEMO) as cat, modesolver.Run(DEMO, potential=formula) as frm:
            a, b = cat.pivot(), frm.pivot()
        for name in ("n_s", "r", "N_star", "A_s"):
            self.assertAlmostEqual(a[name] / b[name], 1.0, delta=1e-10, msg=name)

    def test_keyword_arguments_build_a_model_from_formulas(self):
        run = modesolver.Run(potential="0.5 * m^2 * phi^2", params={"m": 1e-5}, phi0=17.0, efolds=55,
                             k_min=1e-4, k_max=1.0, count=10, threads=1)
        with run:
            v = run.pivot()
            # Quadratic slow roll: n_s ~ 1 - 2/(N + 1/2), r ~ 8/(N + 1/2) (common practice), here to a few percent.
            self.assertAlmostEqual(v["n_s"], 1 - 2 / 55.5, delta=2e-3)
            self.assertAlmostEqual(v["r"], 8 / 55.5, delta=0.01)
            self.assertEqual(run.N_star, v["N_star"])

    def test_sampler_change_and_rerun(self):
        with modesolver.Run(DEMO, threads=1) as run:
            first = run.pivot()
            run.set_params(alpha=2.0)
            changed = run.pivot()
            run.set_params(alpha=4.0)  # the deck's own value
            back = run.pivot()
        self.assertNotEqual(first["n_s"], changed["n_s"])
        self.assertEqual(first, back)

    def test_start_efolds_and_log_amplitude_keys(self):
        # The keys added to decks and the command line are settable here too: a start 70 e-folds before the end gives
        # N_total = 70 (the start is solved to 1e-7 e-folds), and ln(10^10 A_s) = 3.044 normalises like A_s itself.
        with modesolver.Run(text=SMALL, threads=1) as run:
            run.set("start.efolds", 70.0)
            run.set("normalisation.ln_10_10_a_s", 3.044)
            p = run.pivot()
            run.set("normalisation.a_s", float(np.exp(3.044) * 1e-10))
            q = run.pivot()
        self.assertAlmostEqual(p["N_total"], 70.0, delta=1e-6)
        self.assertEqual(p["A_s"], q["A_s"])

    def test_samples_and_interpolation_agree_at_the_nodes(self):
        with modesolver.Run(text=SMALL) as run:
            run.spectrum()
            k, ps, pt, err = run.samples()
            self.assertEqual(k.shape, ps.shape)
            self.assertTrue(np.all(np.diff(k) > 0))
            self.assertTrue(np.all(err >= 0))
            ips, ipt = run.spectra_at(k[1:-1])
        np.testing.assert_allclose(ips, ps[1:-1], rtol=1e-12)
        np.testing.assert_allclose(ipt, pt[1:-1], rtol=1e-12)

    def test_primordial_spectra_on_a_boltzmann_grid(self):
        k = modesolver.log_k_grid(1e-6, 5.0, per_decade=10)
        self.assertAlmostEqual(k[0], 1e-6)
        self.assertAlmostEqual(k[-1], 5.0)
        with modesolver.Run(DEMO, threads=1) as run:
            ps, pt = modesolver.primordial_spectra(k, run=run, count=60)
            v = run.results()
            kp = np.array([v["k_pivot"]])
            ps_star, pt_star = run.spectra_at(kp)
        self.assertEqual(ps.shape, k.shape)
        self.assertTrue(np.all(ps > 0) and np.all(pt > 0))
        # The spectrum at the pivot is A_s to the deck's tolerance (1e-5) plus the interpolation between modes.
        self.assertAlmostEqual(ps_star[0] / v["A_s"], 1.0, delta=1e-4)
        self.assertAlmostEqual((pt_star / ps_star)[0] / v["r"], 1.0, delta=1e-4)
        # A red tilt: P_s falls with k across the grid.
        self.assertGreater(ps[0], ps[-1])

    def test_flags_and_warnings_are_strings(self):
        with modesolver.Run(DEMO, count=8) as run:
            run.spectrum()
            self.assertTrue(all(isinstance(w, str) for w in run.warnings))
            self.assertTrue(all(isinstance(f, str) for f in run.flags))
        with self.assertRaises(modesolver.InputError) as cm:
            modesolver.Run(DEMO, params={"unused": 1.0}, count=8).spectrum()
        self.assertIn("model.parameters.unused", cm.exception.message)


class ErrorTests(unittest.TestCase):
    def test_input_error_carries_the_message_and_code(self):
        with self.assertRaises(modesolver.InputError) as cm:
            modesolver.Run(text='[model]\ncatalogue = "nope"\n', source_name="mine.toml").pivot()
        self.assertEqual(cm.exception.code, 2)
        self.assertIn("mine.toml:2: model.catalogue names no catalogue model 'nope'", str(cm.exception))

    def test_physics_error(self):
        with self.assertRaises(modesolver.PhysicsError) as cm:
            modesolver.Run(os.path.join(BAD, "never-ends.toml")).pivot()
        self.assertEqual(cm.exception.code, 3)
        self.assertNotIn("\n", cm.exception.message)

    def test_bad_key_and_value(self):
        with self.assertRaises(modesolver.InputError):
            modesolver.Run(text=SMALL, settings={"modes.nothing": 1.0})
        with self.assertRaises(TypeError):
            modesolver.Run(text=SMALL, nothing=1.0)
        with modesolver.Run(text=SMALL, tolerance=0.5) as run:
            with self.assertRaises(modesolver.InputError) as cm:
                run.pivot()
            self.assertIn("modes.tolerance must lie in (0, 0.1)", cm.exception.message)

    def test_misuse(self):
        with modesolver.Run(text=SMALL) as run:
            with self.assertRaises(modesolver.UsageError):
                run.spectra_at([0.05])
            with self.assertRaises(modesolver.UsageError):
                run.errors()
            with self.assertRaises(modesolver.UsageError):
                run.tolerance_met
            run.spectrum()
            with self.assertRaises(modesolver.InputError) as cm:
                run.spectra_at([10.0])
            self.assertIn("outside the run's k range", cm.exception.message)
        with self.assertRaises(modesolver.UsageError):
            run.pivot()  # closed


class PackagingTests(unittest.TestCase):
    def test_the_in_tree_backend_builds_a_wheel(self):
        sys.path.insert(0, PYTHON_DIR)
        import _build

        with tempfile.TemporaryDirectory() as d:
            name = _build.build_wheel(d)
            with zipfile.ZipFile(os.path.join(d, name)) as z:
                names = z.namelist()
                record = z.read(next(n for n in names if n.endswith("RECORD"))).decode()
        self.assertIn("modesolver/run.py", names)
        self.assertIn("modesolver/__init__.py", names)
        self.assertIn("modesolver/run.py,sha256=", record)
        # Native files other than the library (publishing copies some beside it) stay out of the wheel.
        self.assertEqual([n for n in names if n.endswith(".so")],
                         ["modesolver/lib/libmodesolver.so"] if os.path.exists(
                             os.path.join(PYTHON_DIR, "modesolver", "lib", "libmodesolver.so")) else [])

    def test_the_example_runs(self):
        env = dict(os.environ)
        out = subprocess.run([sys.executable, os.path.join(PYTHON_DIR, "examples", "boltzmann_grid.py")],
                             capture_output=True, text=True, env=env, timeout=300)
        self.assertEqual(out.returncode, 0, out.stderr)
        self.assertIn("P_s =", out.stdout)


if __name__ == "__main__":
    unittest.main()
