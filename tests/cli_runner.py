"""The command line run in-process for the tests: exit code, standard output and standard
error of ``selector <argv>`` (every argument passed as text, as a shell would)."""
import io
from contextlib import redirect_stderr, redirect_stdout

from selector.views.cli import main


def run(*argv):
    out, err = io.StringIO(), io.StringIO()
    with redirect_stdout(out), redirect_stderr(err):
        code = main([str(a) for a in argv])
    return code, out.getvalue(), err.getvalue()
