"""The one date every output file carries, so that building the same design twice gives the
same bytes: never the clock.

Order of precedence, following the reproducible-builds specification of ``SOURCE_DATE_EPOCH``
(https://reproducible-builds.org/specs/source-date-epoch/): if the environment sets
``SOURCE_DATE_EPOCH`` (an integer count of seconds since 1970-01-01T00:00:00Z, as ``date +%s``
prints it) that instant wins; otherwise the design file's ``date`` (YYYY-MM-DD) at midnight
UTC; otherwise the fixed :data:`FALLBACK`. A malformed value is bad input (exit 2): the
specification asks the build to fail rather than fall back silently.
"""

from __future__ import annotations

import os
import re
from collections.abc import Mapping
from datetime import UTC, date, datetime

from geomgen.errors import InputError

#: the date of a design that gives none, with no SOURCE_DATE_EPOCH set
FALLBACK = datetime(2000, 1, 1, tzinfo=UTC)
ENV_KEY = "SOURCE_DATE_EPOCH"
_EPOCH_RE = re.compile(r"-?[0-9]+")


def output_time(design=None, environ: Mapping[str, str] | None = None) -> datetime:
    """The output date (an aware datetime in UTC) of a design (anything with a ``date``
    attribute, a string YYYY-MM-DD or None, e.g. :class:`geomgen.design.Design`), or of no
    design. ``environ`` defaults to ``os.environ``; the function reads nothing else."""
    env = os.environ if environ is None else environ
    raw = env.get(ENV_KEY)
    if raw is not None and raw.strip() != "":
        text = raw.strip()
        if not _EPOCH_RE.fullmatch(text):
            raise InputError(
                f"an integer number of seconds since 1970-01-01T00:00:00Z (got {raw!r})",
                path=ENV_KEY,
            )
        try:
            return datetime.fromtimestamp(int(text), tz=UTC)
        except (OverflowError, OSError, ValueError):
            raise InputError(
                f"a date between years 1 and 9999 (got {raw!r})", path=ENV_KEY
            ) from None
    given = getattr(design, "date", None)
    if isinstance(given, datetime):
        return given.astimezone(UTC) if given.tzinfo else given.replace(tzinfo=UTC)
    if isinstance(given, date):
        return datetime(given.year, given.month, given.day, tzinfo=UTC)
    if isinstance(given, str) and given:
        try:
            day = date.fromisoformat(given)  # the design loader has checked it already
        except ValueError as err:
            raise InputError(f"a day of the calendar YYYY-MM-DD ({err})", path="date") from None
        return datetime(day.year, day.month, day.day, tzinfo=UTC)
    return FALLBACK
