# Root conftest: pytest puts this folder first on sys.path, so the doctests of leanspan/ and
# the tests import the same (checked-out) package even after a non-editable `pip install .`.
import os

# the command line's BLAS setting (leanspan/cli/__init__.py), before numpy loads
for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")


def pytest_addoption(parser):
    parser.addoption("--fuzz-long", action="store_true", default=False,
                     help="tests/test_fuzz.py: ten times more generated inputs")
