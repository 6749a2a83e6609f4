"""`python -m losslane` runs the command line."""

import sys

from losslane.cli import main

sys.exit(main())
