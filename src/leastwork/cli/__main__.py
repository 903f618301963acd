"""``python -m leastwork.cli``: the command line (as ``python -m leastwork``)."""

import sys

from . import main

sys.exit(main())
