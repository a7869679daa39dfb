"""Allow ``python -m planpack``."""

import sys

from planpack.cli import main

sys.exit(main())
