"""The safety caution every output of halosift carries (light: the CLI's --help shows it without loading the engine)."""

CAUTION = (
    "SAFETY: halosift predictions are estimates from a kinetic model, not procedures. "
    "Radical halogenation uses toxic, corrosive reagents (chlorine gas, bromine, sulfuryl chloride, NBS) "
    "and releases HCl or HBr gas; light sources and initiators can start fast, exothermic chain reactions, "
    "and over-reaction gives polyhalogenated products. Plan and run any reaction only under a proper risk "
    "assessment, with suitable containment, and in line with local codes and licensed practice."
)
