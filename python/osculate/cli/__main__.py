"""``python -m osculate.cli``: the console script."""

import sys

from . import main

sys.exit(main())
