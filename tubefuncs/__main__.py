"""``python -m tubefuncs ...`` runs the ``tubefuncs`` command."""

import sys

from .cli import main

sys.exit(main())
