"""Content hashes: the one way hornproof names a definition by its content.

A case definition, a cache entry and a sweep point are each hashed as the SHA-256 of their
canonical JSON (sorted keys, no spaces, UTF-8), so equal content gives an equal hash whatever
the key order or file layout it came from.
"""

import hashlib
import json


def canonical_json(value):
    """Canonical JSON text of ``value``: sorted keys, no spaces, non-ASCII kept, NaN refused.

    Values JSON cannot hold (paths, numpy scalars) are written with ``str``.
    """
    return json.dumps(value, sort_keys=True, separators=(",", ":"), ensure_ascii=False,
                      allow_nan=False, default=str)


def content_sha256(value, length=None):
    """Hex SHA-256 of :func:`canonical_json` of ``value``; the first ``length`` digits if given."""
    digest = hashlib.sha256(canonical_json(value).encode("utf-8")).hexdigest()
    return digest[:length] if length else digest
