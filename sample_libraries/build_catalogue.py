"""Rebuild the bundled sample files from the structure list held in this module.

The scenario is invented: "Wrenfield Saturates" is a fictional supplier of
hydrocarbon building blocks, and every catalogue ID, pack size, price, purity
and stock flag below is made up (seeded random numbers). Only the structures
and their common names are real chemistry.

Run from the repository root::

    /work/venv/bin/python -m halosift.sample_libraries.build_catalogue

It writes ``catalogue.csv``, ``catalogue.parquet`` and ``bad_rows.csv`` next to
this file. The same seed always gives byte-identical CSV files.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable, Sequence
from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.parquet as pq
from rdkit import Chem, RDLogger

HERE = Path(__file__).resolve().parent
SEED = 20240917
SUPPLIER = "Wrenfield Saturates (fictional supplier)"
ID_PREFIX = "WRS-"
# A quirk of the invented supplier: naphthalene kept its two-letter code from
# an old paper catalogue. It proves that an ID reading "NA" stays a string.
LEGACY_IDS = {"naphthalene": "NA"}

CLASSES = ("acyclic", "cycloalkane", "bridged", "alkene", "alkyne", "alkylarene")
COLUMNS = ("catalog_id", "name", "smiles", "pack_size_g", "price_eur",
           "purity_pct", "in_stock", "class")

# (common name, SMILES, class). Every SMILES names a distinct compound; the
# deliberate repeats live in DUPLICATES below.
STRUCTURES: tuple[tuple[str, str, str], ...] = (
    # --- acyclic alkanes, C1-C12 ---
    ("methane", "C", "acyclic"),
    ("ethane", "CC", "acyclic"),
    ("propane", "CCC", "acyclic"),
    ("butane", "CCCC", "acyclic"),
    ("isobutane", "CC(C)C", "acyclic"),
    ("pentane", "CCCCC", "acyclic"),
    ("isopentane (2-methylbutane)", "CCC(C)C", "acyclic"),
    ("neopentane (2,2-dimethylpropane)", "CC(C)(C)C", "acyclic"),
    ("hexane", "CCCCCC", "acyclic"),
    ("2-methylpentane", "CCCC(C)C", "acyclic"),
    ("3-methylpentane", "CCC(C)CC", "acyclic"),
    ("2,2-dimethylbutane", "CCC(C)(C)C", "acyclic"),
    ("2,3-dimethylbutane", "CC(C)C(C)C", "acyclic"),
    ("heptane", "CCCCCCC", "acyclic"),
    ("2-methylhexane", "CCCCC(C)C", "acyclic"),
    ("3-methylhexane", "CCCC(C)CC", "acyclic"),
    ("(R)-3-methylhexane", "CCC[C@H](C)CC", "acyclic"),
    ("2,2-dimethylpentane", "CCCC(C)(C)C", "acyclic"),
    ("2,3-dimethylpentane", "CCC(C)C(C)C", "acyclic"),
    ("2,4-dimethylpentane", "CC(C)CC(C)C", "acyclic"),
    ("3,3-dimethylpentane", "CCC(C)(C)CC", "acyclic"),
    ("3-ethylpentane", "CCC(CC)CC", "acyclic"),
    ("2,2,3-trimethylbutane", "CC(C)C(C)(C)C", "acyclic"),
    ("octane", "CCCCCCCC", "acyclic"),
    ("2-methylheptane", "CCCCCC(C)C", "acyclic"),
    ("3-methylheptane", "CCCCC(C)CC", "acyclic"),
    ("4-methylheptane", "CCCC(C)CCC", "acyclic"),
    ("3-ethylhexane", "CCCC(CC)CC", "acyclic"),
    ("2,2-dimethylhexane", "CCCCC(C)(C)C", "acyclic"),
    ("2,3-dimethylhexane", "CCCC(C)C(C)C", "acyclic"),
    ("2,4-dimethylhexane", "CCC(C)CC(C)C", "acyclic"),
    ("2,5-dimethylhexane", "CC(C)CCC(C)C", "acyclic"),
    ("3,3-dimethylhexane", "CCCC(C)(C)CC", "acyclic"),
    ("3,4-dimethylhexane", "CCC(C)C(C)CC", "acyclic"),
    ("meso-3,4-dimethylhexane", "CC[C@@H](C)[C@@H](C)CC", "acyclic"),
    ("(3R,4R)-3,4-dimethylhexane", "CC[C@@H](C)[C@H](C)CC", "acyclic"),
    ("3-ethyl-2-methylpentane", "CCC(CC)C(C)C", "acyclic"),
    ("3-ethyl-3-methylpentane", "CCC(C)(CC)CC", "acyclic"),
    ("2,2,3-trimethylpentane", "CCC(C)C(C)(C)C", "acyclic"),
    ("isooctane (2,2,4-trimethylpentane)", "CC(C)CC(C)(C)C", "acyclic"),
    ("2,3,3-trimethylpentane", "CCC(C)(C)C(C)C", "acyclic"),
    ("2,3,4-trimethylpentane", "CC(C)C(C)C(C)C", "acyclic"),
    ("2,2,3,3-tetramethylbutane", "CC(C)(C)C(C)(C)C", "acyclic"),
    ("nonane", "CCCCCCCCC", "acyclic"),
    ("2-methyloctane", "CCCCCCC(C)C", "acyclic"),
    ("3-methyloctane", "CCCCCC(C)CC", "acyclic"),
    ("4-methyloctane", "CCCCC(C)CCC", "acyclic"),
    ("4-ethylheptane", "CCCC(CC)CCC", "acyclic"),
    ("2,6-dimethylheptane", "CC(C)CCCC(C)C", "acyclic"),
    ("2,2,5-trimethylhexane", "CC(C)CCC(C)(C)C", "acyclic"),
    ("2,3,5-trimethylhexane", "CC(C)CC(C)C(C)C", "acyclic"),
    ("2,2,4,4-tetramethylpentane", "CC(C)(C)CC(C)(C)C", "acyclic"),
    ("2,2,3,3-tetramethylpentane", "CCC(C)(C)C(C)(C)C", "acyclic"),
    ("3,3-diethylpentane", "CCC(CC)(CC)CC", "acyclic"),
    ("decane", "CCCCCCCCCC", "acyclic"),
    ("2-methylnonane", "CCCCCCCC(C)C", "acyclic"),
    ("3-methylnonane", "CCCCCCC(C)CC", "acyclic"),
    ("5-methylnonane", "CCCCC(C)CCCC", "acyclic"),
    ("4-propylheptane", "CCCC(CCC)CCC", "acyclic"),
    ("2,7-dimethyloctane", "CC(C)CCCCC(C)C", "acyclic"),
    ("2,2,5,5-tetramethylhexane", "CC(C)(C)CCC(C)(C)C", "acyclic"),
    ("3,3,4,4-tetramethylhexane", "CCC(C)(C)C(C)(C)CC", "acyclic"),
    ("undecane", "CCCCCCCCCCC", "acyclic"),
    ("2-methyldecane", "CCCCCCCCC(C)C", "acyclic"),
    ("3-methyldecane", "CCCCCCCC(C)CC", "acyclic"),
    ("dodecane", "CCCCCCCCCCCC", "acyclic"),
    ("2-methylundecane", "CCCCCCCCCC(C)C", "acyclic"),
    ("isododecane (2,2,4,6,6-pentamethylheptane)", "CC(CC(C)(C)C)CC(C)(C)C", "acyclic"),
    # --- cycloalkanes ---
    ("cyclopropane", "C1CC1", "cycloalkane"),
    ("cyclobutane", "C1CCC1", "cycloalkane"),
    ("cyclopentane", "C1CCCC1", "cycloalkane"),
    ("cyclohexane", "C1CCCCC1", "cycloalkane"),
    ("cycloheptane", "C1CCCCCC1", "cycloalkane"),
    ("cyclooctane", "C1CCCCCCC1", "cycloalkane"),
    ("cyclononane", "C1CCCCCCCC1", "cycloalkane"),
    ("cyclodecane", "C1CCCCCCCCC1", "cycloalkane"),
    ("cycloundecane", "C1CCCCCCCCCC1", "cycloalkane"),
    ("cyclododecane", "C1CCCCCCCCCCC1", "cycloalkane"),
    ("methylcyclopropane", "CC1CC1", "cycloalkane"),
    ("ethylcyclopropane", "CCC1CC1", "cycloalkane"),
    ("isopropylcyclopropane", "CC(C)C1CC1", "cycloalkane"),
    ("1,1-dimethylcyclopropane", "CC1(C)CC1", "cycloalkane"),
    ("cis-1,2-dimethylcyclopropane", "C[C@@H]1C[C@@H]1C", "cycloalkane"),
    ("trans-1,2-dimethylcyclopropane", "C[C@@H]1C[C@H]1C", "cycloalkane"),
    ("bicyclopropyl", "C1CC1C1CC1", "cycloalkane"),
    ("methylcyclobutane", "CC1CCC1", "cycloalkane"),
    ("1,1-dimethylcyclobutane", "CC1(C)CCC1", "cycloalkane"),
    ("methylcyclopentane", "CC1CCCC1", "cycloalkane"),
    ("ethylcyclopentane", "CCC1CCCC1", "cycloalkane"),
    ("propylcyclopentane", "CCCC1CCCC1", "cycloalkane"),
    ("isopropylcyclopentane", "CC(C)C1CCCC1", "cycloalkane"),
    ("butylcyclopentane", "CCCCC1CCCC1", "cycloalkane"),
    ("tert-butylcyclopentane", "CC(C)(C)C1CCCC1", "cycloalkane"),
    ("1,1-dimethylcyclopentane", "CC1(C)CCCC1", "cycloalkane"),
    ("cis-1,2-dimethylcyclopentane", "C[C@@H]1CCC[C@@H]1C", "cycloalkane"),
    ("trans-1,2-dimethylcyclopentane", "C[C@@H]1CCC[C@H]1C", "cycloalkane"),
    ("cis-1,3-dimethylcyclopentane", "C[C@@H]1CC[C@H](C)C1", "cycloalkane"),
    ("trans-1,3-dimethylcyclopentane", "C[C@@H]1CC[C@@H](C)C1", "cycloalkane"),
    ("bicyclopentyl", "C1CCC(C1)C1CCCC1", "cycloalkane"),
    ("methylcyclohexane", "CC1CCCCC1", "cycloalkane"),
    ("ethylcyclohexane", "CCC1CCCCC1", "cycloalkane"),
    ("propylcyclohexane", "CCCC1CCCCC1", "cycloalkane"),
    ("isopropylcyclohexane", "CC(C)C1CCCCC1", "cycloalkane"),
    ("butylcyclohexane", "CCCCC1CCCCC1", "cycloalkane"),
    ("isobutylcyclohexane", "CC(C)CC1CCCCC1", "cycloalkane"),
    ("sec-butylcyclohexane", "CCC(C)C1CCCCC1", "cycloalkane"),
    ("tert-butylcyclohexane", "CC(C)(C)C1CCCCC1", "cycloalkane"),
    ("pentylcyclohexane", "CCCCCC1CCCCC1", "cycloalkane"),
    ("hexylcyclohexane", "CCCCCCC1CCCCC1", "cycloalkane"),
    ("cyclopropylcyclohexane", "C1CC1C1CCCCC1", "cycloalkane"),
    ("1,1-dimethylcyclohexane", "CC1(C)CCCCC1", "cycloalkane"),
    ("1-ethyl-1-methylcyclohexane", "CCC1(C)CCCCC1", "cycloalkane"),
    ("1,2-dimethylcyclohexane", "CC1CCCCC1C", "cycloalkane"),
    ("cis-1,2-dimethylcyclohexane", "C[C@@H]1CCCC[C@@H]1C", "cycloalkane"),
    ("trans-1,2-dimethylcyclohexane", "C[C@@H]1CCCC[C@H]1C", "cycloalkane"),
    ("cis-1,3-dimethylcyclohexane", "C[C@@H]1CCC[C@H](C)C1", "cycloalkane"),
    ("trans-1,3-dimethylcyclohexane", "C[C@@H]1CCC[C@@H](C)C1", "cycloalkane"),
    ("cis-1,4-dimethylcyclohexane", "C[C@H]1CC[C@@H](C)CC1", "cycloalkane"),
    ("trans-1,4-dimethylcyclohexane", "C[C@H]1CC[C@H](C)CC1", "cycloalkane"),
    ("1,1,3-trimethylcyclohexane", "CC1CCCC(C)(C)C1", "cycloalkane"),
    ("1,2,4-trimethylcyclohexane", "CC1CCC(C)C(C)C1", "cycloalkane"),
    ("1,3,5-trimethylcyclohexane", "CC1CC(C)CC(C)C1", "cycloalkane"),
    ("cis-1-tert-butyl-4-methylcyclohexane", "C[C@H]1CC[C@H](CC1)C(C)(C)C", "cycloalkane"),
    ("trans-1-tert-butyl-4-methylcyclohexane", "C[C@H]1CC[C@@H](CC1)C(C)(C)C", "cycloalkane"),
    ("p-menthane", "CC1CCC(CC1)C(C)C", "cycloalkane"),
    ("trans-p-menthane", "C[C@H]1CC[C@@H](CC1)C(C)C", "cycloalkane"),
    ("bicyclohexyl", "C1CCC(CC1)C1CCCCC1", "cycloalkane"),
    ("dicyclohexylmethane", "C1CCC(CC1)CC1CCCCC1", "cycloalkane"),
    ("1,2-dicyclohexylethane", "C(CC1CCCCC1)C1CCCCC1", "cycloalkane"),
    ("methylcycloheptane", "CC1CCCCCC1", "cycloalkane"),
    ("methylcyclooctane", "CC1CCCCCCC1", "cycloalkane"),
    # --- bridged, fused, spiro and cage ring systems ---
    ("bicyclo[1.1.0]butane", "C1C2CC12", "bridged"),
    ("bicyclo[1.1.1]pentane", "C1C2CC1C2", "bridged"),
    ("[1.1.1]propellane", "C1C23CC12C3", "bridged"),
    ("bicyclo[2.1.1]hexane", "C1CC2CC1C2", "bridged"),
    ("bicyclo[2.2.0]hexane", "C1CC2CCC12", "bridged"),
    ("bicyclo[3.1.0]hexane", "C1CC2CC2C1", "bridged"),
    ("norcarane (bicyclo[4.1.0]heptane)", "C1CCC2CC2C1", "bridged"),
    ("bicyclo[3.2.0]heptane", "C1CC2CCC2C1", "bridged"),
    ("bicyclo[4.2.0]octane", "C1CCC2CCC2C1", "bridged"),
    ("norbornane (bicyclo[2.2.1]heptane)", "C1CC2CCC1C2", "bridged"),
    ("1-methylnorbornane", "CC12CCC(CC1)C2", "bridged"),
    ("2-methylnorbornane", "CC1CC2CCC1C2", "bridged"),
    ("7,7-dimethylnorbornane", "CC1(C)C2CCC1CC2", "bridged"),
    ("bornane", "CC12CCC(CC1)C2(C)C", "bridged"),
    ("fenchane", "CC12CCC(C1)C(C)(C)C2", "bridged"),
    ("bicyclo[2.2.2]octane", "C1CC2CCC1CC2", "bridged"),
    ("1-methylbicyclo[2.2.2]octane", "CC12CCC(CC1)CC2", "bridged"),
    ("bicyclo[3.2.1]octane", "C1CC2CCC(C1)C2", "bridged"),
    ("bicyclo[3.2.2]nonane", "C1CC2CCC(C1)CC2", "bridged"),
    ("bicyclo[3.3.1]nonane", "C1CC2CCCC(C1)C2", "bridged"),
    ("cis-bicyclo[3.3.0]octane", "[C@@H]12CCC[C@@H]1CCC2", "bridged"),
    ("cis-hydrindane", "[C@@H]12CCCC[C@@H]1CCC2", "bridged"),
    ("trans-hydrindane", "[C@@H]12CCCC[C@H]1CCC2", "bridged"),
    ("decalin (cis/trans mixture)", "C1CCC2CCCCC2C1", "bridged"),
    ("cis-decalin", "[C@@H]12CCCC[C@@H]1CCCC2", "bridged"),
    ("trans-decalin", "[C@@H]12CCCC[C@H]1CCCC2", "bridged"),
    ("spiro[2.2]pentane", "C1CC12CC2", "bridged"),
    ("spiro[2.5]octane", "C1CCC2(CC1)CC2", "bridged"),
    ("spiro[3.3]heptane", "C1CC2(C1)CCC2", "bridged"),
    ("spiro[4.4]nonane", "C1CCC2(C1)CCCC2", "bridged"),
    ("spiro[4.5]decane", "C1CCC2(C1)CCCCC2", "bridged"),
    ("spiro[5.5]undecane", "C1CCC2(CC1)CCCCC2", "bridged"),
    ("pinane", "CC1CCC2CC1C2(C)C", "bridged"),
    ("carane", "CC1CCC2C(C1)C2(C)C", "bridged"),
    ("tetrahydrodicyclopentadiene", "C1CC2C3CCC(C3)C2C1", "bridged"),
    ("prismane", "C12C3C1C1C2C31", "bridged"),
    ("quadricyclane", "C1C2C3C2C2C1C32", "bridged"),
    ("cubane", "C12C3C4C1C1C2C3C41", "bridged"),
    ("twistane", "C1CC2CC3CCC2CC13", "bridged"),
    ("noradamantane", "C1C2CC3CC1CC3C2", "bridged"),
    ("adamantane", "C1C2CC3CC1CC(C2)C3", "bridged"),
    ("1-methyladamantane", "CC12CC3CC(CC(C3)C1)C2", "bridged"),
    ("2-methyladamantane", "CC1C2CC3CC(C2)CC1C3", "bridged"),
    ("1-ethyladamantane", "CCC12CC3CC(CC(C3)C1)C2", "bridged"),
    ("2,2-dimethyladamantane", "CC1(C)C2CC3CC(C2)CC1C3", "bridged"),
    ("1,3-dimethyladamantane", "CC12CC3CC(C)(C1)CC(C3)C2", "bridged"),
    ("1,3,5-trimethyladamantane", "CC12CC3CC(C)(C1)CC(C)(C3)C2", "bridged"),
    ("1,3,5,7-tetramethyladamantane", "CC12CC3(C)CC(C)(C1)CC(C)(C3)C2", "bridged"),
    ("homoadamantane", "C1CC2CC3CC1CC(C2)C3", "bridged"),
    ("diamantane", "C1C2CC3C4CC5CC(C14)C(C2)C3C5", "bridged"),
    # --- alkenes (any non-aromatic C=C) ---
    ("ethylene", "C=C", "alkene"),
    ("propene", "C=CC", "alkene"),
    ("1-butene", "C=CCC", "alkene"),
    ("(E)-2-butene", "C/C=C/C", "alkene"),
    ("(Z)-2-butene", r"C/C=C\C", "alkene"),
    ("isobutylene", "C=C(C)C", "alkene"),
    ("1-pentene", "C=CCCC", "alkene"),
    ("(E)-2-pentene", "C/C=C/CC", "alkene"),
    ("(Z)-2-pentene", r"C/C=C\CC", "alkene"),
    ("2-methyl-1-butene", "C=C(C)CC", "alkene"),
    ("3-methyl-1-butene", "C=CC(C)C", "alkene"),
    ("2-methyl-2-butene", "CC=C(C)C", "alkene"),
    ("1-hexene", "C=CCCCC", "alkene"),
    ("(E)-2-hexene", "C/C=C/CCC", "alkene"),
    ("(E)-3-hexene", "CC/C=C/CC", "alkene"),
    ("(Z)-3-hexene", r"CC/C=C\CC", "alkene"),
    ("2-methyl-1-pentene", "C=C(C)CCC", "alkene"),
    ("4-methyl-1-pentene", "C=CCC(C)C", "alkene"),
    ("2-methyl-2-pentene", "CCC=C(C)C", "alkene"),
    ("(E)-4-methyl-2-pentene", "CC(C)/C=C/C", "alkene"),
    ("2-ethyl-1-butene", "C=C(CC)CC", "alkene"),
    ("3,3-dimethyl-1-butene", "C=CC(C)(C)C", "alkene"),
    ("2,3-dimethyl-1-butene", "C=C(C)C(C)C", "alkene"),
    ("2,3-dimethyl-2-butene", "CC(C)=C(C)C", "alkene"),
    ("1-heptene", "C=CCCCCC", "alkene"),
    ("1-octene", "C=CCCCCCC", "alkene"),
    ("(E)-4-octene", "CCC/C=C/CCC", "alkene"),
    ("2,4,4-trimethyl-1-pentene", "C=C(C)CC(C)(C)C", "alkene"),
    ("2,4,4-trimethyl-2-pentene", "CC(C)=CC(C)(C)C", "alkene"),
    ("1-decene", "C=CCCCCCCCC", "alkene"),
    ("1-dodecene", "C=CCCCCCCCCCC", "alkene"),
    ("allene (propadiene)", "C=C=C", "alkene"),
    ("1,3-butadiene", "C=CC=C", "alkene"),
    ("isoprene", "C=CC(C)=C", "alkene"),
    ("(E)-1,3-pentadiene", "C=C/C=C/C", "alkene"),
    ("2,3-dimethyl-1,3-butadiene", "C=C(C)C(C)=C", "alkene"),
    ("1,5-hexadiene", "C=CCCC=C", "alkene"),
    ("1,7-octadiene", "C=CCCCCC=C", "alkene"),
    ("2,5-dimethyl-2,4-hexadiene", "CC(C)=CC=C(C)C", "alkene"),
    ("myrcene", "C=CC(=C)CCC=C(C)C", "alkene"),
    ("cyclobutene", "C1=CCC1", "alkene"),
    ("methylenecyclobutane", "C=C1CCC1", "alkene"),
    ("cyclopentene", "C1=CCCC1", "alkene"),
    ("1-methylcyclopentene", "CC1=CCCC1", "alkene"),
    ("methylenecyclopentane", "C=C1CCCC1", "alkene"),
    ("cyclopentadiene", "C1=CCC=C1", "alkene"),
    ("cyclohexene", "C1=CCCCC1", "alkene"),
    ("1-methylcyclohexene", "CC1=CCCCC1", "alkene"),
    ("3-methylcyclohexene", "CC1CCCC=C1", "alkene"),
    ("4-methylcyclohexene", "CC1CCC=CC1", "alkene"),
    ("methylenecyclohexane", "C=C1CCCCC1", "alkene"),
    ("1,3-cyclohexadiene", "C1=CC=CCC1", "alkene"),
    ("1,4-cyclohexadiene", "C1=CCC=CC1", "alkene"),
    ("cycloheptene", "C1=CCCCCC1", "alkene"),
    ("(Z)-cyclooctene", r"C1CC/C=C\CCC1", "alkene"),
    ("(Z,Z)-1,5-cyclooctadiene", r"C1C/C=C\CC/C=C\1", "alkene"),
    ("vinylcyclohexane", "C=CC1CCCCC1", "alkene"),
    ("4-vinylcyclohexene", "C=CC1CCC=CC1", "alkene"),
    ("norbornene", "C1CC2C=CC1C2", "alkene"),
    ("norbornadiene", "C1=CC2C=CC1C2", "alkene"),
    ("5-ethylidene-2-norbornene", "CC=C1CC2C=CC1C2", "alkene"),
    ("bicyclo[2.2.2]oct-2-ene", "C1CC2CCC1C=C2", "alkene"),
    ("dicyclopentadiene", "C1C=CC2C1C1CC2C=C1", "alkene"),
    ("camphene", "CC1(C)C2CCC(C2)C1=C", "alkene"),
    ("alpha-pinene", "CC1=CCC2CC1C2(C)C", "alkene"),
    ("beta-pinene", "C=C1CCC2CC1C2(C)C", "alkene"),
    ("3-carene", "CC1=CCC2C(C1)C2(C)C", "alkene"),
    ("limonene (dipentene)", "CC1=CCC(CC1)C(C)=C", "alkene"),
    ("(R)-limonene", "CC1=CC[C@@H](CC1)C(C)=C", "alkene"),
    ("alpha-terpinene", "CC1=CC=C(CC1)C(C)C", "alkene"),
    ("gamma-terpinene", "CC1=CCC(=CC1)C(C)C", "alkene"),
    ("terpinolene", "CC1=CCC(=C(C)C)CC1", "alkene"),
    ("styrene", "C=Cc1ccccc1", "alkene"),
    ("alpha-methylstyrene", "C=C(C)c1ccccc1", "alkene"),
    ("(E)-beta-methylstyrene", "C/C=C/c1ccccc1", "alkene"),
    ("4-methylstyrene", "C=Cc1ccc(C)cc1", "alkene"),
    ("allylbenzene", "C=CCc1ccccc1", "alkene"),
    ("1,1-diphenylethylene", "C=C(c1ccccc1)c1ccccc1", "alkene"),
    ("(E)-stilbene", "c1ccc(cc1)/C=C/c1ccccc1", "alkene"),
    ("indene", "C1C=Cc2ccccc21", "alkene"),
    ("1,2-dihydronaphthalene", "C1Cc2ccccc2C=C1", "alkene"),
    # --- alkynes ---
    ("acetylene", "C#C", "alkyne"),
    ("propyne", "CC#C", "alkyne"),
    ("1-butyne", "C#CCC", "alkyne"),
    ("2-butyne", "CC#CC", "alkyne"),
    ("1-pentyne", "C#CCCC", "alkyne"),
    ("2-pentyne", "CC#CCC", "alkyne"),
    ("3-methyl-1-butyne", "C#CC(C)C", "alkyne"),
    ("3,3-dimethyl-1-butyne", "C#CC(C)(C)C", "alkyne"),
    ("1-hexyne", "C#CCCCC", "alkyne"),
    ("3-hexyne", "CCC#CCC", "alkyne"),
    ("1-octyne", "C#CCCCCCC", "alkyne"),
    ("4-octyne", "CCCC#CCCC", "alkyne"),
    ("1,7-octadiyne", "C#CCCCCC#C", "alkyne"),
    ("vinylacetylene (but-1-en-3-yne)", "C=CC#C", "alkyne"),
    ("ethynylcyclohexane", "C#CC1CCCCC1", "alkyne"),
    ("cyclooctyne", "C1CCCC#CCC1", "alkyne"),
    ("phenylacetylene", "C#Cc1ccccc1", "alkyne"),
    ("1-phenyl-1-propyne", "CC#Cc1ccccc1", "alkyne"),
    ("3-phenyl-1-propyne", "C#CCc1ccccc1", "alkyne"),
    ("diphenylacetylene", "c1ccc(cc1)C#Cc1ccccc1", "alkyne"),
    # --- alkylarenes and other arenes ---
    ("benzene", "c1ccccc1", "alkylarene"),
    ("toluene", "Cc1ccccc1", "alkylarene"),
    ("ethylbenzene", "CCc1ccccc1", "alkylarene"),
    ("propylbenzene", "CCCc1ccccc1", "alkylarene"),
    ("cumene (isopropylbenzene)", "CC(C)c1ccccc1", "alkylarene"),
    ("butylbenzene", "CCCCc1ccccc1", "alkylarene"),
    ("sec-butylbenzene", "CCC(C)c1ccccc1", "alkylarene"),
    ("(R)-sec-butylbenzene", "CC[C@@H](C)c1ccccc1", "alkylarene"),
    ("isobutylbenzene", "CC(C)Cc1ccccc1", "alkylarene"),
    ("tert-butylbenzene", "CC(C)(C)c1ccccc1", "alkylarene"),
    ("pentylbenzene", "CCCCCc1ccccc1", "alkylarene"),
    ("tert-pentylbenzene", "CCC(C)(C)c1ccccc1", "alkylarene"),
    ("neopentylbenzene", "CC(C)(C)Cc1ccccc1", "alkylarene"),
    ("hexylbenzene", "CCCCCCc1ccccc1", "alkylarene"),
    ("octylbenzene", "CCCCCCCCc1ccccc1", "alkylarene"),
    ("dodecylbenzene", "CCCCCCCCCCCCc1ccccc1", "alkylarene"),
    ("cyclopropylbenzene", "C1CC1c1ccccc1", "alkylarene"),
    ("cyclopentylbenzene", "C1CCC(C1)c1ccccc1", "alkylarene"),
    ("cyclohexylbenzene", "C1CCC(CC1)c1ccccc1", "alkylarene"),
    ("o-xylene", "Cc1ccccc1C", "alkylarene"),
    ("m-xylene", "Cc1cccc(C)c1", "alkylarene"),
    ("p-xylene", "Cc1ccc(C)cc1", "alkylarene"),
    ("2-ethyltoluene", "CCc1ccccc1C", "alkylarene"),
    ("3-ethyltoluene", "CCc1cccc(C)c1", "alkylarene"),
    ("4-ethyltoluene", "CCc1ccc(C)cc1", "alkylarene"),
    ("o-cymene", "Cc1ccccc1C(C)C", "alkylarene"),
    ("m-cymene", "Cc1cccc(c1)C(C)C", "alkylarene"),
    ("p-cymene", "Cc1ccc(cc1)C(C)C", "alkylarene"),
    ("3-tert-butyltoluene", "Cc1cccc(c1)C(C)(C)C", "alkylarene"),
    ("4-tert-butyltoluene", "Cc1ccc(cc1)C(C)(C)C", "alkylarene"),
    ("1,2-diethylbenzene", "CCc1ccccc1CC", "alkylarene"),
    ("1,3-diethylbenzene", "CCc1cccc(CC)c1", "alkylarene"),
    ("1,4-diethylbenzene", "CCc1ccc(CC)cc1", "alkylarene"),
    ("1,3-diisopropylbenzene", "CC(C)c1cccc(c1)C(C)C", "alkylarene"),
    ("1,4-diisopropylbenzene", "CC(C)c1ccc(cc1)C(C)C", "alkylarene"),
    ("1,3-di-tert-butylbenzene", "CC(C)(C)c1cccc(c1)C(C)(C)C", "alkylarene"),
    ("1,4-di-tert-butylbenzene", "CC(C)(C)c1ccc(cc1)C(C)(C)C", "alkylarene"),
    ("hemimellitene (1,2,3-trimethylbenzene)", "Cc1cccc(C)c1C", "alkylarene"),
    ("pseudocumene (1,2,4-trimethylbenzene)", "Cc1ccc(C)c(C)c1", "alkylarene"),
    ("mesitylene (1,3,5-trimethylbenzene)", "Cc1cc(C)cc(C)c1", "alkylarene"),
    ("5-tert-butyl-m-xylene", "Cc1cc(C)cc(c1)C(C)(C)C", "alkylarene"),
    ("4-tert-butyl-o-xylene", "Cc1ccc(cc1C)C(C)(C)C", "alkylarene"),
    ("1,3,5-triethylbenzene", "CCc1cc(CC)cc(CC)c1", "alkylarene"),
    ("1,3,5-triisopropylbenzene", "CC(C)c1cc(cc(c1)C(C)C)C(C)C", "alkylarene"),
    ("1,3,5-tri-tert-butylbenzene", "CC(C)(C)c1cc(cc(c1)C(C)(C)C)C(C)(C)C", "alkylarene"),
    ("prehnitene (1,2,3,4-tetramethylbenzene)", "Cc1ccc(C)c(C)c1C", "alkylarene"),
    ("isodurene (1,2,3,5-tetramethylbenzene)", "Cc1cc(C)c(C)c(C)c1", "alkylarene"),
    ("durene (1,2,4,5-tetramethylbenzene)", "Cc1cc(C)c(C)cc1C", "alkylarene"),
    ("pentamethylbenzene", "Cc1cc(C)c(C)c(C)c1C", "alkylarene"),
    ("hexamethylbenzene", "Cc1c(C)c(C)c(C)c(C)c1C", "alkylarene"),
    ("hexaethylbenzene", "CCc1c(CC)c(CC)c(CC)c(CC)c1CC", "alkylarene"),
    ("diphenylmethane", "c1ccc(cc1)Cc1ccccc1", "alkylarene"),
    ("4-methyldiphenylmethane", "Cc1ccc(cc1)Cc1ccccc1", "alkylarene"),
    ("triphenylmethane", "c1ccc(cc1)C(c1ccccc1)c1ccccc1", "alkylarene"),
    ("tetraphenylmethane", "c1ccc(cc1)C(c1ccccc1)(c1ccccc1)c1ccccc1", "alkylarene"),
    ("1,1-diphenylethane", "CC(c1ccccc1)c1ccccc1", "alkylarene"),
    ("bibenzyl (1,2-diphenylethane)", "c1ccc(cc1)CCc1ccccc1", "alkylarene"),
    ("1,3-diphenylpropane", "c1ccc(cc1)CCCc1ccccc1", "alkylarene"),
    ("2,2-diphenylpropane", "CC(C)(c1ccccc1)c1ccccc1", "alkylarene"),
    ("bicumyl (2,3-dimethyl-2,3-diphenylbutane)", "CC(C)(c1ccccc1)C(C)(C)c1ccccc1", "alkylarene"),
    ("indane", "c1ccc2c(c1)CCC2", "alkylarene"),
    ("1-methylindane", "CC1CCc2ccccc12", "alkylarene"),
    ("2-methylindane", "CC1Cc2ccccc2C1", "alkylarene"),
    ("5-methylindane", "Cc1ccc2c(c1)CCC2", "alkylarene"),
    ("tetralin", "c1ccc2c(c1)CCCC2", "alkylarene"),
    ("1-methyltetralin", "CC1CCCc2ccccc12", "alkylarene"),
    ("6-methyltetralin", "Cc1ccc2c(c1)CCCC2", "alkylarene"),
    ("naphthalene", "c1ccc2ccccc2c1", "alkylarene"),
    ("1-methylnaphthalene", "Cc1cccc2ccccc12", "alkylarene"),
    ("2-methylnaphthalene", "Cc1ccc2ccccc2c1", "alkylarene"),
    ("1-ethylnaphthalene", "CCc1cccc2ccccc12", "alkylarene"),
    ("2-ethylnaphthalene", "CCc1ccc2ccccc2c1", "alkylarene"),
    ("2-isopropylnaphthalene", "CC(C)c1ccc2ccccc2c1", "alkylarene"),
    ("2-tert-butylnaphthalene", "CC(C)(C)c1ccc2ccccc2c1", "alkylarene"),
    ("1,2-dimethylnaphthalene", "Cc1ccc2ccccc2c1C", "alkylarene"),
    ("1,3-dimethylnaphthalene", "Cc1cc(C)c2ccccc2c1", "alkylarene"),
    ("1,4-dimethylnaphthalene", "Cc1ccc(C)c2ccccc12", "alkylarene"),
    ("1,5-dimethylnaphthalene", "Cc1cccc2c(C)cccc12", "alkylarene"),
    ("1,8-dimethylnaphthalene", "Cc1cccc2cccc(C)c12", "alkylarene"),
    ("2,3-dimethylnaphthalene", "Cc1cc2ccccc2cc1C", "alkylarene"),
    ("2,6-dimethylnaphthalene", "Cc1ccc2cc(C)ccc2c1", "alkylarene"),
    ("2,7-dimethylnaphthalene", "Cc1ccc2ccc(C)cc2c1", "alkylarene"),
    ("2,6-diisopropylnaphthalene", "CC(C)c1ccc2cc(ccc2c1)C(C)C", "alkylarene"),
    ("1-phenylnaphthalene", "c1ccc(cc1)-c1cccc2ccccc12", "alkylarene"),
    ("acenaphthene", "C1Cc2cccc3cccc1c23", "alkylarene"),
    ("biphenyl", "c1ccc(cc1)-c1ccccc1", "alkylarene"),
    ("2-methylbiphenyl", "Cc1ccccc1-c1ccccc1", "alkylarene"),
    ("3-methylbiphenyl", "Cc1cccc(c1)-c1ccccc1", "alkylarene"),
    ("4-methylbiphenyl", "Cc1ccc(cc1)-c1ccccc1", "alkylarene"),
    ("4-ethylbiphenyl", "CCc1ccc(cc1)-c1ccccc1", "alkylarene"),
    ("4-tert-butylbiphenyl", "CC(C)(C)c1ccc(cc1)-c1ccccc1", "alkylarene"),
    ("4,4'-dimethylbiphenyl", "Cc1ccc(cc1)-c1ccc(C)cc1", "alkylarene"),
    ("m-terphenyl", "c1ccc(cc1)-c1cccc(c1)-c1ccccc1", "alkylarene"),
    ("p-terphenyl", "c1ccc(cc1)-c1ccc(cc1)-c1ccccc1", "alkylarene"),
    ("fluorene", "c1ccc2c(c1)Cc1ccccc1-2", "alkylarene"),
    ("9-methylfluorene", "CC1c2ccccc2-c2ccccc12", "alkylarene"),
    ("9,9-dimethylfluorene", "CC1(C)c2ccccc2-c2ccccc12", "alkylarene"),
    ("anthracene", "c1ccc2cc3ccccc3cc2c1", "alkylarene"),
    ("9-methylanthracene", "Cc1c2ccccc2cc2ccccc12", "alkylarene"),
    ("9,10-dihydroanthracene", "c1ccc2c(c1)Cc1ccccc1C2", "alkylarene"),
    ("phenanthrene", "c1ccc2c(c1)ccc1ccccc12", "alkylarene"),
    ("9,10-dihydrophenanthrene", "c1ccc2c(c1)CCc1ccccc1-2", "alkylarene"),
    ("pyrene", "c1cc2ccc3cccc4ccc(c1)c2c34", "alkylarene"),
    ("triptycene", "c1ccc2c(c1)C1c3ccccc3C2c2ccccc21", "alkylarene"),
    ("[2.2]paracyclophane", "C1Cc2ccc(cc2)CCc2ccc1cc2", "alkylarene"),
)

# The supplier lists a few compounds twice under a second catalogue entry,
# with the structure written differently: (name as listed, SMILES, class,
# SMILES of the first listing). They let duplicate detection be seen.
DUPLICATES: tuple[tuple[str, str, str, str], ...] = (
    ("2-methylpropane", "C(C)(C)C", "acyclic", "CC(C)C"),
    ("2,2-dimethylpropane", "C(C)(C)(C)C", "acyclic", "CC(C)(C)C"),
    ("hexamethylene (cyclohexane)", "C(C1)CCCC1", "cycloalkane", "C1CCCCC1"),
    ("tricyclo[3.3.1.1(3,7)]decane (adamantane)", "C1C3CC2CC(CC1C2)C3", "bridged",
     "C1C2CC3CC1CC(C2)C3"),
    ("methylbenzene (toluene)", "c1ccccc1C", "alkylarene", "Cc1ccccc1"),
    ("1,4-dimethylbenzene (p-xylene)", "CC1=CC=C(C)C=C1", "alkylarene", "Cc1ccc(C)cc1"),
)

# Rows the engine must reject, plus a few good rows for contrast:
# (name, SMILES, class or "" when not a hydrocarbon, note). Each note
# starts with the reason code the row is meant to show ("ok" for good rows,
# "duplicate" for a repeat of a good row), then a plain-language description.
BAD_ROWS: tuple[tuple[str, str, str, str], ...] = (
    ("toluene", "Cc1ccccc1", "alkylarene",
     "ok: good row for contrast"),
    ("cyclohexane", "C1CCCCC1", "cycloalkane",
     "ok: good row for contrast"),
    ("unclosed ring", "C1CC", "",
     "unparsable: ring bond 1 is opened but never closed"),
    ("unclosed branch", "CC(C", "",
     "unparsable: branch parenthesis is never closed"),
    ("unknown element", "CCX", "",
     "unparsable: X is not an element symbol"),
    ("missing structure", "", "",
     "empty: SMILES cell left blank"),
    ("adamantane", "C1C2CC3CC1CC(C2)C3", "bridged",
     "ok: good row for contrast"),
    ("ethanol", "CCO", "",
     "heteroatom: contains oxygen"),
    ("chloromethane", "CCl", "",
     "heteroatom: contains chlorine"),
    ("benzoic acid", "OC(=O)c1ccccc1", "",
     "heteroatom: contains oxygen (carboxylic acid)"),
    ("tetramethylsilane", "C[Si](C)(C)C", "",
     "heteroatom: contains silicon"),
    ("tetramethylammonium", "C[N+](C)(C)C", "",
     "charged: quaternary ammonium cation (also contains nitrogen)"),
    ("methyl anion", "[CH3-]", "",
     "charged: carbanion, net charge -1"),
    ("tert-butyl cation", "C[C+](C)C", "",
     "charged: carbocation, net charge +1"),
    ("methyl radical", "[CH3]", "",
     "radical: carbon with an unpaired electron"),
    ("ethyl radical", "C[CH2]", "",
     "radical: carbon with an unpaired electron"),
    ("ethane + propane", "CC.CCC", "",
     "fragments: two separate molecules in one row"),
    ("benzene + methane", "c1ccccc1.C", "",
     "fragments: two separate molecules in one row"),
    ("methane-13C", "[13CH4]", "",
     "isotope: carbon-13 label"),
    ("deuteromethane", "[2H]C", "",
     "isotope: deuterium label"),
    ("hexacontahectane (C160 linear alkane)", "C" * 160, "acyclic",
     "too_large: 160 carbon atoms"),
    ("isooctane", "CC(C)CC(C)(C)C", "acyclic",
     "ok: good row for contrast"),
    ("toluene, listed again", "c1ccccc1C", "alkylarene",
     "duplicate: same compound as the first row, written differently"),
)

# Rough per-gram price level by class (EUR), so bridged cages cost more than
# commodity solvents; purely invented.
_PRICE_LEVEL = {"acyclic": 0.9, "cycloalkane": 1.6, "bridged": 9.0,
                "alkene": 1.3, "alkyne": 3.5, "alkylarene": 1.1}
_PACK_SIZES = (1.0, 5.0, 10.0, 25.0, 100.0, 250.0, 500.0)


def canonical(smiles: str) -> str:
    """RDKit canonical isomeric SMILES, or '' when the string does not parse."""
    RDLogger.DisableLog("rdApp.*")
    try:
        mol = Chem.MolFromSmiles(smiles) if smiles else None
    finally:
        RDLogger.EnableLog("rdApp.*")
    return Chem.MolToSmiles(mol) if mol is not None else ""


def check_structures() -> None:
    """Fail loudly if the structure table holds a bad or accidentally repeated entry."""
    seen: dict[str, str] = {}
    for name, smiles, klass in STRUCTURES:
        mol = Chem.MolFromSmiles(smiles)
        if mol is None:
            raise ValueError(f"{name}: SMILES {smiles!r} does not parse")
        if klass not in CLASSES:
            raise ValueError(f"{name}: unknown class {klass!r}")
        if any(a.GetSymbol() not in ("C", "H") or a.GetFormalCharge()
               or a.GetNumRadicalElectrons() or a.GetIsotope() for a in mol.GetAtoms()):
            raise ValueError(f"{name}: not a neutral unlabelled hydrocarbon")
        if len(Chem.GetMolFrags(mol)) != 1:
            raise ValueError(f"{name}: more than one fragment")
        key = Chem.MolToSmiles(mol)
        if key in seen:
            raise ValueError(f"{name}: same structure as {seen[key]}")
        seen[key] = name
    for name, smiles, _klass, first in DUPLICATES:
        if smiles == first or canonical(smiles) != canonical(first) or canonical(first) not in seen:
            raise ValueError(f"duplicate row {name}: must rewrite a listed structure")


def _ids(rng: np.random.Generator, count: int) -> list[str]:
    """Distinct invented five-digit catalogue IDs."""
    numbers = rng.choice(np.arange(10000, 100000), size=count, replace=False)
    return [f"{ID_PREFIX}{int(n)}" for n in numbers]


def build_catalogue(seed: int = SEED) -> pd.DataFrame:
    """The catalogue rows: every structure, then the deliberate duplicate listings
    placed right after their class, with seeded invented commercial data."""
    check_structures()
    rows: list[tuple[str, str, str]] = []
    for klass in CLASSES:
        rows += [(n, s, c) for n, s, c in STRUCTURES if c == klass]
        rows += [(n, s, c) for n, s, c, _ in DUPLICATES if c == klass]
    rng = np.random.default_rng(seed)
    ids = _ids(rng, len(rows))
    pack = rng.choice(_PACK_SIZES, size=len(rows))
    noise = rng.lognormal(mean=0.0, sigma=0.35, size=len(rows))
    purity = rng.uniform(95.0, 99.9, size=len(rows))
    stock = rng.random(len(rows)) < 0.8
    level = np.array([_PRICE_LEVEL[c] for _, _, c in rows])
    # Bulk discount: price grows slower than pack size.
    price = np.maximum(8.0, 12.0 * level * pack ** 0.65 * noise)
    frame = pd.DataFrame({
        "catalog_id": [LEGACY_IDS.get(n, i) for (n, _, _), i in zip(rows, ids)],
        "name": [n for n, _, _ in rows],
        "smiles": [s for _, s, _ in rows],
        "pack_size_g": pack.astype("float64"),
        "price_eur": np.round(price, 2),
        "purity_pct": np.round(purity, 1),
        "in_stock": stock.astype(bool),
        "class": [c for _, _, c in rows],
    })
    if frame["catalog_id"].duplicated().any():
        raise ValueError("catalogue IDs are not unique")
    return frame


def build_bad_rows(seed: int = SEED) -> pd.DataFrame:
    """The rejection showcase: same columns as the catalogue plus ``note``."""
    rng = np.random.default_rng(seed + 1)
    n = len(BAD_ROWS)
    numbers = rng.choice(np.arange(90000, 100000), size=n, replace=False)
    return pd.DataFrame({
        "catalog_id": [f"{ID_PREFIX}X{int(k)}" for k in numbers],
        "name": [r[0] for r in BAD_ROWS],
        "smiles": [r[1] for r in BAD_ROWS],
        "pack_size_g": rng.choice(_PACK_SIZES[:4], size=n).astype("float64"),
        "price_eur": np.round(rng.uniform(10.0, 90.0, size=n), 2),
        "purity_pct": np.round(rng.uniform(95.0, 99.9, size=n), 1),
        "in_stock": rng.random(n) < 0.8,
        "class": [r[2] for r in BAD_ROWS],
        "note": [r[3] for r in BAD_ROWS],
    })


def _atomic_write(path: Path, write: Callable[[Path], None]) -> None:
    """Write via a temporary file in the same folder, then os.replace, so a
    crash never leaves a half-written sample file behind."""
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    os.close(fd)
    try:
        write(Path(tmp))
        # mkstemp creates the file private (0600); sample data is meant to be read.
        os.chmod(tmp, 0o644)
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def _write_csv(frame: pd.DataFrame, path: Path) -> None:
    """CSV with '\\n' line ends and no index."""
    _atomic_write(path, lambda p: frame.to_csv(p, index=False, lineterminator="\n"))


def _write_parquet(frame: pd.DataFrame, path: Path) -> None:
    """Parquet with explicit column types and a note on where the data comes from."""
    schema = pa.schema([
        ("catalog_id", pa.string()), ("name", pa.string()), ("smiles", pa.string()),
        ("pack_size_g", pa.float64()), ("price_eur", pa.float64()),
        ("purity_pct", pa.float64()), ("in_stock", pa.bool_()), ("class", pa.string()),
    ], metadata={"source": f"{SUPPLIER}; invented sample data for halosift"})
    table = pa.Table.from_pydict({c: frame[c].tolist() for c in COLUMNS}, schema=schema)
    _atomic_write(path, lambda p: pq.write_table(table, p))


def write_all(folder: Path = HERE, seed: int = SEED) -> dict[str, int]:
    """Write all three sample files into ``folder``; return rows per file."""
    catalogue = build_catalogue(seed)
    bad = build_bad_rows(seed)
    _write_csv(catalogue, folder / "catalogue.csv")
    _write_parquet(catalogue, folder / "catalogue.parquet")
    _write_csv(bad, folder / "bad_rows.csv")
    return {"catalogue.csv": len(catalogue), "catalogue.parquet": len(catalogue),
            "bad_rows.csv": len(bad)}


def main(argv: Sequence[str] | None = None) -> int:
    """Command-line entry: rebuild the files and print row counts."""
    del argv
    for name, count in write_all().items():
        print(f"{name}: {count} rows")
    counts = build_catalogue()["class"].value_counts()
    for klass in CLASSES:
        print(f"  {klass}: {counts.get(klass, 0)}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
