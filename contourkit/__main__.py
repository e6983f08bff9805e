"""``python -m contourkit``: the command line (see :mod:`contourkit.cli`)."""
import sys

from .cli import main

if __name__ == "__main__":
    sys.exit(main())
