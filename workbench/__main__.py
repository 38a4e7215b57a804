"""`python -m workbench` is the same as the `gdof` command."""

import sys

from .cli import main

sys.exit(main())
