"""Former name of :mod:`selector.user_files`, kept only while ``selector/views`` still
imports it; the lead drops this alias after the views rewrite is merged."""
import sys

from . import user_files

sys.modules[__name__] = user_files
