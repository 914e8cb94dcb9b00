"""``python -m stillair.addin.audit BOOK|DIR ...``: the audit on its own (as ``stillair audit``)."""

import sys

from .folder import main

sys.exit(main())
