"""The Mexican standard acceleration file reader (UNAM).

Sources: the real file unam_usp000cgtd_CUP50401.012 (tests/data/strong-motion/SOURCES.md)
and its own header lines, quoted beside each check; an independent parse of its data
rows with numpy.loadtxt; the gal (1 cm/s²). The header prints peaks to 0.01 gal, so the
comparison with it is to that printed resolution and the 0.1 % check is against the
independent parse.
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake._errors import GroundshakeWarning, RecordError
from groundshake.records import read_record

from _strong_motion import (assert_channels, assert_columns, assert_options_checked,
                            assert_text_refused, data_file, round_trip, round_trip_sac)

NAME = "unam_usp000cgtd_CUP50401.012"


def _read(path, **kw):
    with pytest.warns(GroundshakeWarning, match="17502 data rows but NUM. TOTAL DE MUESTRAS says 17500"):
        return read_record(path, **kw)


def test_real_file_matches_its_header():
    recs = _read(data_file(NAME))
    # "ORIENTACION C1-C6 (rumbo;orientacion)  : /V/N90E/N00E"
    assert_channels(recs, ["V", "N90E", "N00E"], ["vertical", "horizontal", "horizontal"],
                    {1: 90.0, 2: 0.0})
    # "ACEL. MAX.(Gal), C1-C6 : /0.47/-1.19/1.22", printed to 0.01 gal
    for rec, pga in zip(recs, (0.47, 1.19, 1.22)):
        assert abs(np.max(np.abs(rec.acc)) / 0.01 - pga) <= 0.005 + 1e-12
        # "INTERVALO DE MUESTREO, C1-C6 (s) : /0.004/0.004/0.004",
        # "NUM. TOTAL DE MUESTRAS, C1-C6 : /17500/17500/17500"
        assert rec.dt == 0.004 and rec.n == 17500
    # "ACEL. MAX., C1-C6, EN LA MUESTRA : /10590/9513/10051" (the header does not say
    # whether it counts from 0 or 1: one sample either way)
    for rec, at in zip(recs, (10590, 9513, 10051)):
        assert abs(int(np.argmax(np.abs(rec.acc))) - at) <= 1
    # "CLAVE DE LA ESTACION : CUP5"
    assert [r.name for r in recs] == ["CUP5 V", "CUP5 N90E", "CUP5 N00E"]
    # "FECHA DEL SISMO [GMT] : 2004/01/01", "HORA DE LA PRIMERA MUESTRA (GMT) : 00:00:01"
    # two minutes after the 23:58:02.7 origin: the next day
    assert recs[0].start_time == "2004-01-02T00:00:01Z"


def test_real_file_equals_an_independent_parse():
    recs = _read(data_file(NAME))
    lines = data_file(NAME).read_text(encoding="latin-1").splitlines()
    table = np.loadtxt(lines[109:109 + 17500])  # data from line 110, after the second ruler
    assert_columns(recs, table, 0.01)  # gal
    for k, rec in enumerate(recs):
        assert np.max(np.abs(rec.acc)) == pytest.approx(np.max(np.abs(table[:, k])) * 0.01,
                                                        rel=1e-3)


def test_round_trip_through_our_writers(tmp_path):
    records = _read(data_file(NAME))
    round_trip(records, tmp_path)
    round_trip_sac(records, tmp_path)


def _synthetic(table: np.ndarray, dt: float, comps=("N45W", "UP", "S45W")) -> str:
    n = table.shape[0]
    slash = lambda vals: "/" + "/".join(str(v) for v in vals)  # noqa: E731
    head_lines = ["*" * 40, "ARCHIVO ESTANDAR DE ACELERACION:", "VERSION DEL FORMATO : 2.0",
                  "=" * 40, "DATOS DE LA ESTACION:",
                  "NOMBRE DE LA ESTACION                  : PRUEBA",
                  "CLAVE DE LA ESTACION                   : TST1",
                  f"ORIENTACION C1-C6 (rumbo;orientacion)  : {slash(comps)}",
                  "ORIENTACION C7-C12 (rumbo;orientacion) :",
                  f"INTERVALO DE MUESTREO, C1-C6 (s)       : {slash([dt] * 3)}",
                  "INTERVALO DE MUESTREO, C7-C12 (s)      :",
                  "FECHA DEL SISMO [GMT]                  : 2010/06/15",
                  "HORA EPICENTRO (GMT)                   : 10:00:00.0",
                  "HORA DE LA PRIMERA MUESTRA (GMT)       : 10:00:20",
                  f"NUM. TOTAL DE MUESTRAS, C1-C6          : {slash([n] * 3)}",
                  "UNIDADES DE LOS DATOS                  : Gal (cm/s/s)",
                  "FORMATO DATOS (FORTRAN,10 campos/dato) : 3F10.3",
                  "=" * 40, "DATOS DE ACELERACION:", "---------+" * 3,
                  "   CANAL-1   CANAL-2   CANAL-3", "".join(f"{c:>10}" for c in comps),
                  "---------+" * 3]
    rows = ["".join(f"{v:10.3f}" for v in row) for row in table]
    return "\r\n".join(head_lines + rows) + "\r\n"


def test_synthetic_file_of_other_numbers(tmp_path):
    rng = np.random.default_rng(11)
    table = np.round(rng.normal(0, 300, (120, 3)), 3)
    table[5, 0] = -1234.567
    table[5, 1] = -2345.678  # fields that touch: "-1234.567-2345.678" (3F10.3 fills them)
    path = tmp_path / "mine.001"
    path.write_text(_synthetic(table, 0.01), encoding="latin-1")
    recs = read_record(path)
    assert_columns(recs, table, 0.01, dt=0.01)  # our numbers, gal
    # N45W = 315°, S45W = 225° (quadrant bearings); UP is vertical
    assert recs[0].metadata["azimuth_deg"] == 315.0 and recs[2].metadata["azimuth_deg"] == 225.0
    assert recs[1].metadata["orientation"] == "vertical"
    assert recs[0].start_time == "2010-06-15T10:00:20Z"


def test_options_that_contradict_the_header(tmp_path):
    assert_options_checked(data_file(NAME), RecordError,
                           dt=(0.01, r"dt=0.01 s was given but the .*UNAM.* header says 0.004 s"),
                           units=("m/s2", r"units m/s2 were given but the .*UNAM.* header says cm/s2"))
    text = _synthetic(np.ones((30, 3)), 0.01).replace("/30/30/30", "/40/40/40")
    assert_text_refused(tmp_path / "short.001", text,
                        r"^Mexican standard acceleration \(UNAM\) file .*: 30 data "
                        r"rows; NUM. TOTAL DE MUESTRAS says 40")
