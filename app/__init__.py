"""Calorun's desktop front end (Qt). Holds no physics; importing this package imports no Qt.

The project model (pydantic) is imported here, before any module of the package can import Qt:
pydantic finishes some of its imports lazily, and with PySide6 loaded first, PySide6's import hook
inspects pydantic's half-imported lazy attributes and the import fails with a circular-import error
(seen with pydantic 2.14 and PySide6 6.x when ``app.commands`` was the first module imported).
"""

import solver.model  # noqa: F401  (see above: pydantic complete before Qt)
