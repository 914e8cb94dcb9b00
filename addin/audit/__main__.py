"""``python -m stillair.addin.audit BOOK ...``: the audit on its own (as ``stillair audit``)."""

import sys

from .check import main

sys.exit(main())
