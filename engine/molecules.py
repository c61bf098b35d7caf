"""SMILES in, a validated hydrocarbon or a reasoned rejection out — never an exception."""

from __future__ import annotations

from dataclasses import dataclass

from halosift.engine.parameters import DEFAULT_MAX_HEAVY_ATOMS
from halosift.engine.rdkit_log import quiet_rdkit
from rdkit import Chem
from rdkit.Chem import rdmolops

_ELEMENT_NAMES = {
    "N": "nitrogen", "O": "oxygen", "S": "sulfur", "P": "phosphorus", "F": "fluorine",
    "Cl": "chlorine", "Br": "bromine", "I": "iodine", "B": "boron", "Si": "silicon",
    "Se": "selenium", "Na": "sodium", "K": "potassium", "Li": "lithium", "Mg": "magnesium",
}

#: Rejection codes, in the order they are tested.
REASON_CODES = (
    "empty",
    "unparsable",
    "fragments",
    "heteroatom",
    "isotope",
    "charged",
    "radical",
    "stereo_group",
    "no_carbon",
    "too_large",
)


#: Characters of a SMILES made only of organic-subset carbons (no brackets).
_PLAIN_CARBON = frozenset("Cc0123456789()=#%/\\-:.")


def to_mol(smiles: str | None) -> Chem.Mol | None:
    """Parse SMILES quietly; None when RDKit cannot."""
    if not smiles:
        return None
    with quiet_rdkit():
        try:
            return Chem.MolFromSmiles(smiles)
        except Exception:  # RDKit raises on a few pathological inputs
            return None


@dataclass(frozen=True)
class Parsed:
    """Outcome of validating one input structure."""

    mol: Chem.Mol | None
    """The molecule when accepted, else None."""
    reason_code: str
    """Empty when accepted, else one of :data:`REASON_CODES`."""
    reason: str
    """A sentence for the chemist; empty when accepted."""

    @property
    def ok(self) -> bool:
        """True when the structure was accepted."""
        return self.mol is not None


def _reject(code: str, reason: str) -> Parsed:
    return Parsed(None, code, reason)


def parse_hydrocarbon(smiles: object, max_heavy_atoms: int = DEFAULT_MAX_HEAVY_ATOMS) -> Parsed:
    """Accept neutral, closed-shell, single-fragment, unlabelled C/H molecules."""
    if smiles is None or (isinstance(smiles, float) and smiles != smiles):
        return _reject("empty", "no SMILES given")
    if not isinstance(smiles, str):
        smiles = str(smiles)
    text = smiles.strip()
    if not text:
        return _reject("empty", "no SMILES given")
    mol = to_mol(text)
    if mol is None:
        return _reject("unparsable", f"RDKit cannot parse the SMILES {text[:60]!r}")
    if mol.GetNumAtoms() == 0:
        return _reject("empty", "the SMILES holds no atoms")
    # Only '.' separates atoms in SMILES (every other atom bonds to one written before it), so a
    # string without it is one fragment; with it, ring closures may still join the parts.
    n_frags = len(rdmolops.GetMolFrags(mol)) if "." in text else 1
    if n_frags > 1:
        return _reject("fragments", f"{n_frags} separate fragments; give one molecule per row")
    if _PLAIN_CARBON.issuperset(text):
        # No brackets and no other element letters: every atom is a neutral, unlabelled,
        # closed-shell carbon with implicit hydrogens, so the per-atom checks cannot fail.
        return _size_checked(mol, max_heavy_atoms)
    # One pass over the atoms collects everything the checks below need.
    foreign: set[str] = set()
    isotope = charged = radical = explicit_h = False
    carbons = 0
    for atom in mol.GetAtoms():
        if atom.GetAtomMapNum():
            # A reaction-mapping label, not chemistry: kept, it makes symmetric atoms look different
            # ([CH3:1]C would get two "different" chlorides), so it is dropped before anything is perceived.
            atom.SetAtomMapNum(0)
        z = atom.GetAtomicNum()
        if z == 1:
            explicit_h = True
        elif z != 6:
            foreign.add(atom.GetSymbol())
        else:
            carbons += 1
        isotope = isotope or atom.GetIsotope() != 0
        charged = charged or atom.GetFormalCharge() != 0
        radical = radical or atom.GetNumRadicalElectrons() != 0
    if foreign:
        names = ", ".join(_ELEMENT_NAMES.get(sym, sym) for sym in sorted(foreign))
        return _reject("heteroatom", f"contains {names}; only hydrocarbons (C, H) are modelled")
    if isotope:
        return _reject("isotope", "isotope-labelled atoms; kinetic isotope effects are not modelled")
    if charged:
        return _reject("charged", "charged species (carbocation/carbanion); only neutral molecules are modelled")
    if radical:
        return _reject("radical", "open-shell species (unpaired electrons); only closed-shell molecules are modelled")
    if any(g.GetGroupType() != Chem.StereoGroupType.STEREO_ABSOLUTE for g in mol.GetStereoGroups()):
        # An AND/OR group (CXSMILES |&1:…| or |o1:…|) means a mixture or an unknown configuration;
        # read as plain SMILES it would be one stereoisomer, which changes the stereo outcome.
        return _reject("stereo_group", "CXSMILES AND/OR stereo groups (a mixture or unknown configuration) are not "
                       "modelled; give each stereoisomer as its own row, or the SMILES without the groups")
    if not carbons:
        return _reject("no_carbon", "no carbon atom; only hydrocarbons are modelled")
    if explicit_h:
        # Explicit [H] atoms would hide their hydrogens from the site count.
        with quiet_rdkit():
            mol = Chem.RemoveHs(mol)
    return _size_checked(mol, max_heavy_atoms)


def _size_checked(mol: Chem.Mol, max_heavy_atoms: int) -> Parsed:
    n_heavy = mol.GetNumHeavyAtoms()
    if n_heavy > max_heavy_atoms:
        return _reject("too_large", f"{n_heavy} carbons exceeds the limit of {max_heavy_atoms}")
    return Parsed(mol, "", "")
