"""Observed western boundary current transports to compare Sverdrup estimates with.

A small table of published mean transports, kept apart from the logic, with the source of each
number. Sign convention: positive northward, like ``boundary_current_transport``.
"""

from __future__ import annotations

import numpy as np
import xarray as xr

__all__ = [
    "boundary_current_observations",
    "OBSERVED_BOUNDARY_CURRENTS",
    "balance_section_observations",
    "OBSERVED_BALANCE_SECTIONS",
]

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


def _of_basin(rows, basin):
    """The table's rows of ``basin`` (all of them for None); an unknown basin is refused."""
    if basin is None:
        return rows
    valid = sorted({r["basin"] for r in rows})
    if basin not in valid:
        raise ValueError(
            f"basin: expected one of {valid}, found {basin!r}. Fix: pass one of those or None."
        )
    return [r for r in rows if r["basin"] == basin]


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
    rows = _of_basin(rows, basin)
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
            "lat": col("lat", units="degrees_north", standard_name="latitude",
                       long_name="latitude of the section"),
            "basin": col("basin"),
            "source": col("source"),
            "note": col("note"),
        },
        coords={"current": names},
        attrs={"title": "observed western boundary current transports (published means)"},
    )


#: Sections across a whole basin that test Sverdrup balance: the parts of the transport that
#: the balance speaks of, each with its component, latitude, longitudes of the part (degrees_east,
#: NaN where the part has no single span), transport (Sv, + northward), spread, period and
#: source. "from memory" marks numbers nobody here has re-read in the original.
OBSERVED_BALANCE_SECTIONS = [
    dict(name="RAPID 26.5N Florida Current", basin="atlantic", lat=26.5,
         component="western boundary current", west_lon=-80.0, east_lon=-79.0,
         transport=31.3, spread=3.2, spread_kind="standard deviation of the cable record",
         period="2004-2022",
         source="RAPID-MOCHA array and Florida Current cable, 2004-2022 means (McCarthy et "
                "al. 2015, Prog. Oceanogr. 130, 91-111, for the method; from memory)",
         note="about 13 Sv of it is the upper limb of the overturning (Schmitz & Richardson "
              "1991, Deep-Sea Res.)"),
    dict(name="RAPID 26.5N Ekman", basin="atlantic", lat=26.5, component="Ekman",
         west_lon=-76.75, east_lon=-13.5, transport=3.8, spread=np.nan, spread_kind="",
         period="2004-2022",
         source="RAPID-MOCHA array, 2004-2022 means, from reanalysis winds (McCarthy et al. "
                "2015; from memory)", note=""),
    dict(name="RAPID 26.5N upper mid-ocean", basin="atlantic", lat=26.5,
         component="interior geostrophic", west_lon=-76.75, east_lon=-13.5, transport=-18.1,
         spread=3.5, spread_kind="standard deviation of 10-day means", period="2004-2022",
         source="RAPID-MOCHA array, 2004-2022 means (McCarthy et al. 2015; from memory)",
         note="geostrophic transport above about 1100 m between the Bahamas (Abaco) and Africa "
              "from moored density profiles, with a reference chosen so that the section "
              "conserves mass"),
    dict(name="Pacific 24N, west of 137E", basin="pacific", lat=24.0,
         component="interior residual", west_lon=np.nan, east_lon=137.0, transport=7.5,
         spread=2.5, spread_kind="half the range of the quoted 5-10 Sv",
         period="1985 section (from memory)",
         source="Hautala, Roemmich & Schmitz 1994, J. Geophys. Res. 99, 16041-16052 (from "
                "memory)",
         note="geostrophic plus Ekman transport agrees with Sverdrup from the eastern boundary "
              "to about 137E; west of it 5-10 Sv more northward flow than Sverdrup"),
]

_SECTION_COMPONENTS = ("western boundary current", "Ekman", "interior geostrophic",
                       "interior residual")


def balance_section_observations(basin: str | None = None) -> xr.Dataset:
    """Observed parts of basin-wide sections that test Sverdrup balance, along ``observation``.

    Parameters
    ----------
    basin : {"atlantic", "pacific"}, optional
        Keep only sections of this basin.

    Returns
    -------
    xarray.Dataset
        ``transport`` and ``spread`` (1e6 m3 s-1, positive northward), ``lat``
        (degrees_north), ``west_lon``/``east_lon`` (degrees_east) of the part, ``component``
        (one of "western boundary current", "Ekman", "interior geostrophic", "interior
        residual"), ``basin``, ``period``, ``source``, ``note`` and ``spread_kind``.

    Notes
    -----
    The RAPID numbers are means of 2004-2022 and their spreads are the variability of the
    record, not the error of the mean. The Pacific entry is a statement about the balance,
    not a transport of one current: 5-10 Sv more northward flow west of 137E than Sverdrup.
    """
    rows = OBSERVED_BALANCE_SECTIONS
    rows = _of_basin(rows, basin)

    def col(key, **attrs):
        return xr.DataArray([r[key] for r in rows], dims="observation", attrs=attrs)

    return xr.Dataset(
        {
            "transport": col("transport", units="1e6 m3 s-1",
                             long_name="observed transport of the part, positive northward"),
            "spread": col("spread", units="1e6 m3 s-1", long_name="spread of the observed mean"),
            "spread_kind": col("spread_kind"),
            "lat": col("lat", units="degrees_north", long_name="latitude of the section"),
            "west_lon": col("west_lon", units="degrees_east",
                            long_name="western end of the part"),
            "east_lon": col("east_lon", units="degrees_east",
                            long_name="eastern end of the part"),
            "component": col("component", long_name="what part of the transport",
                             comment="; ".join(_SECTION_COMPONENTS)),
            "basin": col("basin"),
            "period": col("period"),
            "source": col("source"),
            "note": col("note"),
        },
        coords={"observation": [r["name"] for r in rows]},
        attrs={"title": "observed sections that test Sverdrup balance (published means)"},
    )
