"""The version of every JSON document the tool writes.

Keys are only ever added, never renamed; :data:`SCHEMA_VERSION` changes only
when a key is removed or changes meaning.  Each result object's ``to_dict()``
puts it at the top of its document.
"""

from __future__ import annotations

__all__ = ["SCHEMA_VERSION"]

#: Bumped only when a key is removed or changes meaning; new keys do not bump it.
SCHEMA_VERSION = 1
