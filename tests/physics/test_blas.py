"""One BLAS thread for small dense solves; a user's own thread setting is left alone."""

import ast
import subprocess
import sys
from pathlib import Path

import scipy.linalg  # noqa: F401  (load scipy's BLAS too, as the finite elements do)
from threadpoolctl import ThreadpoolController

from cutplan.physics import blas

ROOT = Path(__file__).resolve().parents[2]


def blas_threads():
    return [info["num_threads"] for info in ThreadpoolController().info() if info["user_api"] == "blas"]


def test_single_thread_inside_and_restored_after(monkeypatch):
    for name in blas.USER_THREAD_VARIABLES:
        monkeypatch.delenv(name, raising=False)
    before = blas_threads()
    with blas.single_thread():
        assert all(n == 1 for n in blas_threads())
    assert blas_threads() == before


def test_a_thread_count_the_user_chose_is_respected(monkeypatch):
    monkeypatch.setenv("OPENBLAS_NUM_THREADS", "2")
    before = blas_threads()
    with blas.single_thread():
        assert blas_threads() == before


def test_planning_uniform_pieces_loads_no_scipy():
    # the common plan path (chimes, uniform bars, air columns) runs on numpy alone; scipy.optimize
    # and scipy.io cost about 0.4 s of start-up and are not needed there
    code = ("import sys, cutplan; cutplan.plan(cutplan.load_design(sys.argv[1])); "
            "print(sorted({m.split('.')[1] for m in sys.modules if m.startswith('scipy.')}))")
    out = subprocess.run([sys.executable, "-c", code, str(ROOT / "examples" / "porch-chimes.toml")],
                         capture_output=True, text=True, check=True).stdout
    loaded = set(ast.literal_eval(out))
    assert "optimize" not in loaded and "io" not in loaded, loaded
