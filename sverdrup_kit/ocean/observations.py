"""Observed western boundary current transports to compare Sverdrup estimates with.

A small table of published mean transports, kept apart from the logic, with the source of each
number. Sign convention: positive northward, like ``boundary_current_transport``.
"""

from __future__ import annotations

import numpy as np
import xarray as xr

__all__ = ["boundary_current_observations", "OBSERVED_BOUNDARY_CURRENTS"]

#: name, basin, latitude (degrees_north), transport (Sv, + northward), spread (Sv), what the
#: spread is, source, and a note on what the number contains that Sverdrup dynamics does not.
OBSERVED_BOUNDARY_CURRENTS = [
    dict(name="Florida Current", basin="atlantic", lat=27.0, transport=31.3, spread=3.2,
         spread_kind="standard deviation of the 2004-2022 cable record",
         source="RAPID / Florida Current cable record, 2004-2022",
         note="about 13 Sv of it is the return flow of the overturning, not wind-driven "
              "(Schmitz & Richardson 1991, Deep-Sea Res.)"),
    dict(name="Kuroshio", basin="pacific", lat=30.0, transport=42.0, spread=9.0,
         spread_kind="standard deviation", source="Imawaki et al. 2001, Geophys. Res. Lett.",
         note="ASUKA line south of Japan, net of local recirculation (57 Sv total)"),
    dict(name="East Australian Current", basin="pacific", lat=-27.0, transport=-22.1,
         spread=7.5, spread_kind="standard deviation",
         source="Sloyan et al. 2016, J. Phys. Oceanogr.", note=""),
    dict(name="Agulhas Current", basin="indian", lat=-32.0, transport=-69.7, spread=4.3,
         spread_kind="standard error", source="Bryden et al. 2005, J. Oceanogr.",
         note="includes a strong local recirculation"),
    dict(name="Brazil Current", basin="atlantic", lat=-24.0, transport=-16.0, spread=np.nan,
         spread_kind="", source="Mueller et al. 1998 (about 16 Sv between 20S and 28S)",
         note=""),
    dict(name="North Brazil Current", basin="atlantic", lat=7.0, transport=16.0, spread=2.0,
         spread_kind="uncertainty", source="Garzoli et al. 2004", note=""),
]


def boundary_current_observations(basin: str | None = None) -> xr.Dataset:
    """Observed western boundary current transports as a Dataset along ``current``.

    Parameters
    ----------
    basin : {"atlantic", "pacific", "indian"}, optional
        Keep only currents of this basin.

    Returns
    -------
    xarray.Dataset
        ``transport`` and ``spread`` (1e6 m3 s-1, positive northward), ``lat`` (degrees_north),
        ``basin``, ``source`` and ``note`` along dimension ``current``.
    """
    rows = OBSERVED_BOUNDARY_CURRENTS
    if basin is not None:
        valid = sorted({r["basin"] for r in rows})
        if basin not in valid:
            raise ValueError(
                f"basin: expected one of {valid}, found {basin!r}. Fix: pass one of those or None."
            )
        rows = [r for r in rows if r["basin"] == basin]
    names = [r["name"] for r in rows]

    def col(key, **attrs):
        return xr.DataArray([r[key] for r in rows], dims="current", attrs=attrs)

    return xr.Dataset(
        {
            "transport": col("transport", units="1e6 m3 s-1",
                             long_name="observed western boundary current transport, "
                                       "positive northward"),
            "spread": col("spread", units="1e6 m3 s-1", long_name="spread of the observed mean"),
            "spread_kind": col("spread_kind"),
            "lat": col("lat", units="degrees_north", long_name="latitude of the section"),
            "basin": col("basin"),
            "source": col("source"),
            "note": col("note"),
        },
        coords={"current": names},
        attrs={"title": "observed western boundary current transports (published means)"},
    )
