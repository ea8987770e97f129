"""Tables of the real Earth's geography, kept apart from the logic that reads them.

Three tables, all in degrees (longitude east 0..360, latitude north), read by
:mod:`sverdrup_kit.geometry.land` and :mod:`sverdrup_kit.geometry.basins`:

* :data:`EARTH_PROBES`: points far (several hundred km) from any coast that are land or ocean
  on every global relief from 2 to 1/12 degree; a grid whose mask agrees with nearly all of
  them shows Earth's continents (:func:`looks_like_earth`).
* :data:`EARTH_LANDMARKS`: one point inside each named continent or island, read off an atlas
  (Times Atlas of the World, from memory; each point lies well inside its coast, so that
  1/12 to 2 degree masks all put it on land where they resolve the body at all).
* :data:`EARTH_SEAS`: outlines of marginal seas and sub-basins, each with the basin it belongs
  to and whether its water is counted in that basin's interior transport. An outline may run
  across land freely: it only ever selects ocean cells of its own basin.

Every point and vertex was placed from general geographic knowledge (an atlas, from memory),
not from any data set; tests check them against the relief files of the data recipes.
"""

from __future__ import annotations

import numpy as np

__all__ = ["EARTH_PROBES", "EARTH_LANDMARKS", "EARTH_CONTINENT_NAMES", "EARTH_STRAITS", "EARTH_SEAS",
           "EARTH_PROBE_AGREEMENT", "looks_like_earth"]

#: (lon, lat) of points that are land, and points that are open ocean, on the real Earth.
EARTH_PROBES = {
    "land": [
        (20.0, 10.0),    # Chad, Africa
        (25.0, -22.0),   # Botswana
        (90.0, 60.0),    # central Siberia
        (60.0, 50.0),    # Kazakhstan
        (105.0, 35.0),   # central China
        (78.0, 22.0),    # central India
        (260.0, 50.0),   # Canadian prairies (100W)
        (260.0, 38.0),   # Kansas (100W)
        (300.0, -10.0),  # Amazonia (60W)
        (295.0, -30.0),  # Argentina (65W)
        (134.0, -24.0),  # central Australia
        (0.0, -82.0),    # Antarctic plateau
        (318.0, 72.0),   # Greenland ice sheet (42W)
    ],
    "ocean": [
        (200.0, 30.0),   # North Pacific (160W)
        (220.0, 10.0),   # tropical Pacific (140W)
        (230.0, -30.0),  # South Pacific (130W)
        (210.0, -20.0),  # South Pacific (150W)
        (160.0, 40.0),   # north-west Pacific
        (320.0, 30.0),   # North Atlantic (40W)
        (340.0, 50.0),   # north-east Atlantic (20W)
        (335.0, -20.0),  # South Atlantic (25W)
        (80.0, -25.0),   # Indian Ocean
        (65.0, 10.0),    # Arabian Sea
        (90.0, -45.0),   # southern Indian Ocean
        (200.0, -55.0),  # Southern Ocean (160W)
    ],
}

#: Share of :data:`EARTH_PROBES` a mask must get right to count as the Earth's.
EARTH_PROBE_AGREEMENT = 0.9

#: The continents among :data:`EARTH_LANDMARKS`; every other landmark names an island.
EARTH_CONTINENT_NAMES = ("Eurasia", "Africa", "North America", "South America", "Antarctica",
                         "Australia")

#: Named land bodies: name -> (lon, lat) of a point well inside it. Listed from the largest
#: down, so that a land body holding several points (Australia with New Guinea and Tasmania
#: on coarse grids, where shallow straits close) takes the name of the largest.
EARTH_LANDMARKS = {
    # Continents.
    "Eurasia": (90.0, 60.0),
    "Africa": (20.0, 10.0),
    "North America": (260.0, 50.0),
    "South America": (300.0, -10.0),
    "Antarctica": (0.0, -82.0),
    "Australia": (134.0, -24.0),
    # Islands, roughly by area.
    "Greenland": (318.0, 72.0),
    "New Guinea": (143.0, -6.0),
    "Borneo": (114.0, 1.0),
    "Madagascar": (47.0, -19.0),
    "Baffin Island": (290.0, 68.0),
    "Sumatra": (101.5, 0.0),
    "Honshu": (138.5, 36.0),
    "Victoria Island": (250.0, 71.0),
    "Great Britain": (358.5, 53.0),
    "Ellesmere Island": (280.0, 80.0),
    "Sulawesi": (120.3, -2.0),
    "South Island (New Zealand)": (170.5, -43.8),
    "Java": (110.0, -7.3),
    "North Island (New Zealand)": (176.0, -38.5),
    "Luzon": (121.0, 16.5),
    "Newfoundland": (304.5, 48.5),
    "Cuba": (281.5, 21.7),
    "Iceland": (341.0, 65.0),
    "Mindanao": (125.0, 7.5),
    "Ireland": (352.0, 53.0),
    "Hokkaido": (143.0, 43.5),
    "Sakhalin": (142.8, 50.0),
    "Hispaniola": (288.5, 19.0),
    "Tasmania": (146.5, -42.0),
    "Sri Lanka": (80.7, 7.8),
    "Kyushu": (131.0, 32.5),
    "Taiwan": (121.0, 23.7),
    "Hainan": (109.7, 19.2),
    "Vancouver Island": (234.5, 49.6),
    "Tierra del Fuego": (291.0, -54.0),
    "Shikoku": (133.5, 33.7),
    "Svalbard": (16.0, 78.5),
    # Parts of continents that a coarse grid may cut off through a one-cell-wide neck.
    "Malay Peninsula": (102.0, 4.5),
    "Central America": (276.0, 10.0),
}

#: Straits narrower than a coarse grid's cell: name -> line (lon, lat vertices) along the
#: strait. On a mask that looks like the Earth's, land cells on either side of a line are not
#: joined, so that Great Britain, Sumatra, Taiwan or Greenland stay islands where a 1 or 2
#: degree grid closes the strait (Times Atlas of the World, from memory).
EARTH_STRAITS = {
    "english_channel_north_sea": [(354.0, 48.0), (361.5, 51.0), (364.0, 53.5), (367.0, 57.0)],
    "nares_strait": [(284.0, 76.0), (286.5, 78.3), (290.0, 79.6), (294.0, 81.0),
                     (299.0, 82.3), (302.0, 84.0)],
    "strait_of_malacca": [(95.0, 7.0), (98.0, 5.5), (100.3, 3.2), (101.8, 2.0),
                          (103.8, 1.15), (106.0, 1.0)],
    "taiwan_strait": [(118.0, 21.5), (119.6, 24.0), (120.8, 25.8), (121.5, 26.5)],
    "qiongzhou_strait": [(107.5, 20.1), (111.5, 20.1)],
    "tatar_strait": [(141.5, 45.5), (141.4, 50.0), (141.45, 52.2), (141.8, 53.5),
                     (142.5, 54.5)],
    "strait_of_belle_isle": [(301.0, 50.8), (303.3, 51.3), (304.3, 51.8), (305.5, 52.5)],
    "strait_of_georgia": [(235.0, 48.3), (236.7, 49.3), (234.0, 50.6), (232.0, 51.2)],
    "palk_strait": [(78.8, 8.5), (79.5, 9.3), (80.0, 10.0), (80.5, 10.5)],
    "bass_strait": [(144.0, -39.8), (148.5, -39.8)],
    "torres_strait": [(140.5, -9.9), (144.5, -9.9)],
    "bering_strait": [(190.5, 64.0), (191.2, 65.8), (191.5, 67.5)],
}

# Counted: the sea's water is part of its basin's interior (a sub-basin open to the ocean
# along a whole parallel or behind an island arc the boundary current does not follow).
# Excluded: a marginal sea behind sills or island chains; its water gets its own
# streamfunction from its own eastern edge but is not counted, and where it meets the open
# basin in a row its edge ends the counted interior like a coast.
COUNTED, EXCLUDED = "counted", "excluded"

#: Marginal seas and sub-basins: name -> dict(basin, policy, polygon [(lon, lat), ...], why).
#: Polygon longitudes increase eastward without jumping at 0/360 (359 is followed by 361).
#: The Caribbean and the Gulf of Mexico are excluded by default: they carry the western
#: boundary current system upstream of the Florida Current (Caribbean Current, Loop Current),
#: so the interior ends on the Antilles arc, the Bahamas and Florida, as in comparisons of the
#: Sverdrup interior with the Florida Current at 26.5N (common practice). Pass
#: ``seas={"caribbean": "counted", "gulf_of_mexico": "counted"}`` to count them.
EARTH_SEAS = {
    "bay_of_bengal": dict(
        basin="indian", policy=COUNTED,
        polygon=[(78.0, 5.0), (98.5, 5.0), (98.5, 24.0), (78.0, 24.0)],
        why="open to the Indian Ocean along 5N; its gyre closes on India's east coast",
    ),
    "arabian_sea": dict(
        basin="indian", policy=COUNTED,
        polygon=[(43.0, 5.0), (78.0, 5.0), (78.0, 26.0), (56.6, 26.0), (56.6, 24.5),
                 (43.0, 12.0)],
        why="open to the Indian Ocean along 5N; its western boundary is the Somali Current",
    ),
    "labrador_sea": dict(
        basin="atlantic", policy=COUNTED,
        polygon=[(296.0, 52.0), (317.0, 52.0), (317.0, 66.0), (296.0, 66.0)],
        why="open to the subpolar North Atlantic south of Greenland",
    ),
    "north_sea": dict(
        basin="atlantic", policy=COUNTED,
        polygon=[(357.0, 51.0), (369.0, 51.0), (369.0, 58.0), (365.0, 62.0), (357.0, 62.0)],
        why="shelf sea open to the Norwegian Sea; crossed with Great Britain by rows at "
        "51-60N",
    ),
    "caribbean": dict(
        basin="atlantic", policy=EXCLUDED,
        polygon=[(276.0, 8.0), (296.0, 9.0), (299.0, 10.5), (298.8, 13.0), (298.0, 15.5),
                 (296.5, 17.8), (294.0, 18.3), (290.0, 18.6), (285.5, 20.3), (278.0, 21.5),
                 (275.5, 21.6), (272.0, 21.0), (272.0, 8.0)],
        why="carries the western boundary current system (Caribbean Current) behind the "
        "Antilles arc",
    ),
    "gulf_of_mexico": dict(
        basin="atlantic", policy=EXCLUDED,
        polygon=[(260.0, 17.5), (275.5, 21.6), (278.0, 22.0), (279.5, 23.3), (279.8, 24.5),
                 (278.0, 25.5), (277.3, 28.0), (276.5, 29.5), (275.0, 31.0), (260.0, 31.0)],
        why="carries the Loop Current, upstream of the Florida Current",
    ),
    "hudson_bay": dict(
        basin="atlantic", policy=EXCLUDED,
        polygon=[(265.0, 50.0), (282.0, 50.0), (282.0, 56.0), (287.0, 62.5), (278.0, 66.0),
                 (265.0, 66.0)],
        why="enclosed behind Hudson Strait",
    ),
    "baltic_sea": dict(
        basin="atlantic", policy=EXCLUDED,
        polygon=[(10.0, 53.0), (31.0, 53.0), (31.0, 67.0), (10.0, 67.0), (10.0, 58.0)],
        why="enclosed behind the Danish straits",
    ),
    "mediterranean_black_sea": dict(
        basin="atlantic", policy=EXCLUDED,
        polygon=[(354.5, 30.0), (402.0, 30.0), (402.0, 48.0), (361.0, 48.0), (361.0, 40.5),
                 (357.0, 38.5), (354.5, 37.0)],
        why="enclosed behind the Strait of Gibraltar",
    ),
    "red_sea": dict(
        basin="indian", policy=EXCLUDED,
        polygon=[(32.0, 12.7), (43.4, 12.7), (43.4, 14.0), (40.0, 18.0), (36.0, 28.0),
                 (32.0, 31.0)],
        why="enclosed behind Bab-el-Mandeb",
    ),
    "persian_gulf": dict(
        basin="indian", policy=EXCLUDED,
        polygon=[(47.0, 23.0), (56.3, 23.0), (56.6, 26.6), (56.0, 27.5), (51.0, 31.0),
                 (47.0, 31.0)],
        why="enclosed behind the Strait of Hormuz",
    ),
    "south_china_sea": dict(
        basin="pacific", policy=EXCLUDED,
        # East edge on Luzon's Pacific coast, so that on coarse grids (where Luzon is a
        # small island, crossed) the counted Pacific row still ends there.
        polygon=[(99.0, 25.5), (120.5, 25.5), (120.8, 22.0), (122.2, 18.6), (122.3, 17.0),
                 (121.6, 15.5), (121.8, 14.0), (120.5, 12.5), (117.2, 7.8), (116.5, 6.5),
                 (110.0, -3.0), (104.0, -3.0), (99.0, 3.0)],
        why="behind Luzon, Palawan and Borneo; its own basin-scale gyre",
    ),
    "philippine_and_indonesian_seas": dict(
        basin="pacific", policy=EXCLUDED,
        # East edge on the Pacific coasts of Luzon, Samar and Mindanao (the Mindanao Current
        # and the Kuroshio's source flow along them) and of Halmahera and New Guinea.
        polygon=[(121.8, 14.0), (124.5, 13.8), (125.8, 11.5), (126.2, 9.5), (126.7, 7.0),
                 (126.0, 5.0), (128.8, 2.5), (131.0, -0.5), (138.0, -1.5), (141.0, -3.0),
                 (141.0, -11.0), (104.0, -11.0), (104.0, -3.0), (110.0, -3.0),
                 (116.5, 6.5), (117.2, 7.8), (120.5, 12.5)],
        why="Sulu, Celebes, Molucca, Banda, Flores and Java Seas, behind the Philippines, "
        "Halmahera and New Guinea",
    ),
    "sea_of_japan": dict(
        basin="pacific", policy=EXCLUDED,
        polygon=[(126.0, 33.5), (129.8, 33.5), (130.8, 33.9), (132.5, 34.6), (135.0, 35.0),
                 (137.0, 35.8), (139.0, 36.8), (140.4, 39.0), (140.6, 41.4), (142.0, 43.0),
                 (142.0, 45.6), (142.4, 47.0), (142.4, 52.5), (126.0, 52.5)],
        why="behind Japan's islands and Sakhalin",
    ),
    "sea_of_okhotsk": dict(
        basin="pacific", policy=EXCLUDED,
        polygon=[(142.4, 43.0), (145.5, 43.0), (156.0, 50.5), (156.0, 51.5), (156.5, 62.0),
                 (135.0, 62.0), (135.0, 52.5), (142.4, 52.5)],
        why="behind the Kuril Islands and Kamchatka",
    ),
    "gulf_of_california": dict(
        basin="pacific", policy=EXCLUDED,
        polygon=[(244.5, 32.0), (254.0, 32.0), (254.5, 23.0), (250.2, 22.8)],
        why="behind Baja California",
    ),
    "coral_and_tasman_seas": dict(
        basin="pacific", policy=COUNTED,
        polygon=[(147.0, -10.0), (165.0, -10.0), (175.0, -34.0), (172.0, -41.0),
                 (147.0, -41.0)],
        why="open to the South Pacific; the East Australian Current is its western boundary "
        "current",
    ),
}


def _nearest_cell(lat, lon, lon0, lat0):
    j = int(np.argmin(np.abs(lat - lat0)))
    i = int(np.argmin(np.abs((lon - lon0 + 180.0) % 360.0 - 180.0)))
    return j, i


def cell_of_point(lat, lon, lon0, lat0):
    """(j, i) of the cell whose centre lies nearest to (lon0, lat0), or None off the grid."""
    if lat0 < lat[0] - (lat[1] - lat[0]) or lat0 > lat[-1] + (lat[-1] - lat[-2]):
        return None
    span = float(np.ptp(lon)) + float(np.min(np.diff(lon))) if lon.size > 1 else 0.0
    if span < 359.0:
        d = (lon0 - lon[0]) % 360.0
        if d > span:
            return None
    return _nearest_cell(lat, lon, lon0, lat0)


def looks_like_earth(ocean, lat, lon, *, periodic, cell_of=None) -> bool:
    """Whether an ocean mask (ny, nx) on a global grid shows the real Earth's continents.

    True when the grid closes the circle of longitude, spans 70S to 70N, and the mask agrees
    with at least :data:`EARTH_PROBE_AGREEMENT` of the :data:`EARTH_PROBES`. ``lat``, ``lon``
    are the 1-D axes of a regular grid, or the 2-D centres of a model grid with ``cell_of``
    (``cell_of(lon0, lat0)`` -> (j, i) or None, e.g.
    :meth:`~sverdrup_kit.geometry.curvilinear.CurvilinearGrid.cell_of_point`).
    """
    lat = np.asarray(lat, dtype=np.float64)
    lon = np.asarray(lon, dtype=np.float64)
    if cell_of is None:
        lat_lo, lat_hi = lat[0], lat[-1]

        def cell_of(lon0, lat0):
            return _nearest_cell(lat, lon, lon0, lat0)
    else:
        lat_lo, lat_hi = lat.min(), lat.max()
    if not periodic or lat_lo > -70.0 or lat_hi < 70.0:
        return False
    hits, total = 0, 0
    for want, points in (("land", EARTH_PROBES["land"]), ("ocean", EARTH_PROBES["ocean"])):
        for lon0, lat0 in points:
            cell = cell_of(lon0, lat0)
            total += 1
            hits += cell is not None and bool(ocean[cell]) == (want == "ocean")
    return hits >= EARTH_PROBE_AGREEMENT * total
