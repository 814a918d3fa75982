"""``python -m chargecast …`` runs the command line (see chargecast.cli)."""

import sys

from chargecast.cli import main

if __name__ == "__main__":
    sys.exit(main())
