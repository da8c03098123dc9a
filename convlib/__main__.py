"""``python -m convlib``: the command line (see :mod:`convlib.cli`)."""
import sys

from .cli import main

sys.exit(main())
