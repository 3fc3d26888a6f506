"""``python -m joulebook``: the same as the ``joulebook`` command."""

import sys

from joulebook.faces.cli import main

if __name__ == "__main__":
    sys.exit(main())
