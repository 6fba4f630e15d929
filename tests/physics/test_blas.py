"""One BLAS thread for small dense solves; a user's own thread setting is left alone."""

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
    # the tests run with one BLAS thread (tests/conftest.py): raise it to two first, so the limit
    # has something to do and the count it restores is not already one
    with ThreadpoolController().limit(limits=2, user_api="blas"):
        before = blas_threads()
        assert before and all(n == 2 for n in before)
        with blas.single_thread():
            assert all(n == 1 for n in blas_threads())
        assert blas_threads() == before


def test_a_thread_count_the_user_chose_is_respected(monkeypatch):
    monkeypatch.setenv("OPENBLAS_NUM_THREADS", "2")
    with ThreadpoolController().limit(limits=2, user_api="blas"):
        before = blas_threads()
        with blas.single_thread():
            assert blas_threads() == before


def test_planning_uniform_pieces_loads_no_scipy():
    # the common plan path (chimes, uniform bars, air columns) runs on numpy alone; scipy.optimize
    # and scipy.io cost about 0.4 s of start-up and are not needed there
    code = ("import sys, cutplan; cutplan.plan(cutplan.load_design(sys.argv[1])); "
            "print(' '.join(sorted({m.split('.')[1] for m in sys.modules if m.startswith('scipy.')})))")
    out = subprocess.run([sys.executable, "-c", code, str(ROOT / "examples" / "porch-chimes.toml")],
                         capture_output=True, text=True, check=True).stdout.split()
    assert "optimize" not in out and "io" not in out and "linalg" not in out


def test_scipy_blas_is_limited_even_when_scipy_loads_late():
    # scipy brings its own BLAS; it must be under the limit even if nothing had imported scipy
    # before the first solve (a fresh process, no thread variables set)
    import os

    code = ("from cutplan.physics.blas import single_thread\n"
            "with single_thread():\n"
            "    import scipy.linalg\n"
            "    from threadpoolctl import threadpool_info\n"
            "    print(max(i['num_threads'] for i in threadpool_info() if i['user_api'] == 'blas'))\n")
    env = {k: v for k, v in os.environ.items() if k not in blas.USER_THREAD_VARIABLES}
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True, env=env).stdout
    assert out.strip() == "1"
