"""Start-up shared by the script tests (tests/check_*.py); not a test itself.

The reference libraries (numpy, scipy, GDAL's osgeo) are Debian packages of
the system interpreter; when CMake or PATH picks another python3, the check
re-runs itself under /usr/bin/python3.  The GW_* variables are set by
tests/CMakeLists.txt.
"""
import importlib
import os
import sys

SYSTEM_PYTHON = "/usr/bin/python3"
SOURCE_DIR = os.environ.get("GW_SOURCE_DIR", os.path.join(os.path.dirname(__file__), ".."))


def need_system_python(*modules):
    """Import the named modules; when one is missing and another interpreter
    runs this script, replace the process with the same script under the
    system python3 (the ImportError stands when that does not help)."""
    try:
        for name in modules:
            importlib.import_module(name)
    except ImportError:
        if os.path.exists(SYSTEM_PYTHON) and os.path.realpath(sys.executable) != os.path.realpath(SYSTEM_PYTHON):
            os.execv(SYSTEM_PYTHON, [SYSTEM_PYTHON] + sys.argv)
        raise


def command():
    """The gwdivide to test: GW_COMMAND, else the one on PATH."""
    return os.environ.get("GW_COMMAND", "gwdivide")


def built_command():
    """GW_COMMAND when it names an existing file; None (after saying why)
    otherwise."""
    cmd = os.environ.get("GW_COMMAND")
    if not cmd or not os.path.exists(cmd):
        print("GW_COMMAND not set or missing: %r" % cmd)
        return None
    return cmd
