"""The one refusal of a stored file whose schema this hornproof does not read.

Every versioned file (``fields.h5``, ``result.json``, ``sweep.json``) names its schema, e.g.
``"hornproof.result/1"``: family, slash, format version. A reader that finds anything else
refuses with one line naming the file and the schema it expected, and a hint.
"""

from ...errors import InputError


def refuse_schema(path, found, expected, holder="attribute"):
    """Raise the ``InputError`` for ``path`` holding schema ``found`` where ``expected`` was wanted.

    ``holder`` names where a schema is kept in this kind of file ("attribute" for HDF5, "key"
    for JSON), for the message when there is none.
    """
    family = expected.split("/")[0]
    if isinstance(found, bytes):
        found = found.decode("utf-8", "replace")
    if not found:
        raise InputError(f"{path}: no schema {holder}; not a hornproof file "
                         f"(expected {expected})")
    if not str(found).startswith(family + "/"):
        raise InputError(f"{path}: schema {found!r} is not {family} (expected {expected}); "
                         "not a file of this kind")
    raise InputError(f"{path}: schema {found!r} is not supported (this hornproof reads "
                     f"{expected}); re-run the case with this version, or upgrade hornproof")
