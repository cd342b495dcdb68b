# Root conftest: pytest puts this folder first on sys.path, so the doctests of leanspan/ and
# the tests import the same (checked-out) package even after a non-editable `pip install .`.


def pytest_addoption(parser):
    parser.addoption("--fuzz-long", action="store_true", default=False,
                     help="tests/test_fuzz.py: ten times more generated inputs")
