"""``python -m normform`` runs the command-line tool."""

import sys

from normform.cli import main

sys.exit(main())
