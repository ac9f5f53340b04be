"""The bibliography: every source the core cites, by key.

=================  ===========================================================
``REFERENCES``     key -> ``Ref(short, full, status)``
``cite``           the short form used in steps ("Albert, Dell & Winters 1967")
``full``           the full citation (Vancouver style)
=================  ===========================================================

``status`` says how the item was checked: ``verified`` (the formula or number was read in the
source or in a named secondary source), ``from memory`` (recalled from the named source, needs a
second check before release) or ``common practice`` (a bedside convention with no single source).
"""

from __future__ import annotations

from typing import NamedTuple


class Ref(NamedTuple):
    short: str
    full: str
    status: str


def _r(short: str, full: str, status: str = "verified") -> Ref:
    return Ref(short, full, status)


REFERENCES: dict[str, Ref] = {
    # units
    "bipm2019": _r(
        "SI Brochure 2019",
        "BIPM. The International System of Units (SI Brochure), 9th ed. 2019; "
        "conventional mmHg = 133.322387415 Pa.",
    ),
    "nist811": _r(
        "NIST SP 811 (2008)",
        "Thompson A, Taylor BN. Guide for the Use of the International System of "
        "Units (SI). NIST Special Publication 811, 2008 (1 ft = 0.3048 m; 1 lb = 0.45359237 kg).",
    ),
    "iupac_masses": _r(
        "IUPAC standard atomic weights",
        "IUPAC Commission on Isotopic Abundances and Atomic "
        "Weights. Standard atomic weights (molar masses of glucose, urea, lactate, phosphate).",
        "common practice",
    ),
    # acid-base
    "henderson1908": _r(
        "Henderson 1908; Hasselbalch 1916",
        "Henderson LJ. Concerning the relationship between the "
        "strength of acids and their capacity to preserve neutrality. Am J Physiol 1908;21:173-9. "
        "Hasselbalch KA. Biochem Z 1916;78:112-44.",
        "from memory",
    ),
    "kassirer1965": _r(
        "Kassirer & Bleich 1965",
        "Kassirer JP, Bleich HL. Rapid estimation of plasma carbon dioxide "
        "tension from pH and total carbon dioxide content. N Engl J Med 1965;272:1067-8.",
    ),
    "nccls1994": _r(
        "NCCLS C46 / CLSI C46-A2 2009",
        "CLSI. Blood Gas and pH Analysis and Related Measurements; "
        "Approved Guideline, 2nd ed. CLSI document C46-A2, 2009 (form verified in Vet Med Sci "
        "2018;4:Table 1, citing NCCLS 1994).",
    ),
    "siggaard1971": _r(
        "Siggaard-Andersen 1971/1977",
        "Siggaard-Andersen O. An acid-base chart for arterial blood "
        "with normal and pathophysiological reference areas. Scand J Clin Lab Invest 1971;27:239-45; "
        "The Van Slyke equation. Scand J Clin Lab Invest 1977;37 Suppl 146:15-20.",
        "from memory",
    ),
    "lang2002": _r(
        "Lang & Zander 2002",
        "Lang W, Zander R. The accuracy of calculated base excess in blood. "
        "Clin Chem Lab Med 2002;40:404-10.",
    ),
    "albert1967": _r(
        "Albert, Dell & Winters 1967",
        "Albert MS, Dell RB, Winters RW. Quantitative displacement of "
        "acid-base equilibrium in metabolic acidosis. Ann Intern Med 1967;66:312-22.",
    ),
    "narins1980": _r(
        "Narins & Emmett 1980",
        "Narins RG, Emmett M. Simple and mixed acid-base disorders: a practical "
        "approach. Medicine (Baltimore) 1980;59:161-87.",
    ),
    "berend2014": _r(
        "Berend, de Vries & Gans 2014",
        "Berend K, de Vries APJ, Gans ROB. Physiological approach to "
        "assessment of acid-base disturbances. N Engl J Med 2014;371:1434-45.",
    ),
    "kidney360_2022": _r(
        "Kidney360 2022", "Linear compensation formulas, Table 3. Kidney360 2022;3(8):1458-66."
    ),
    "brandis": _r(
        "Brandis, Acid-Base Physiology",
        "Brandis K. Acid-Base Physiology (online textbook): compensation rules and delta-ratio bands.",
    ),
    "martinu2003": _r(
        "Martinu, Menzies & Dial 2003",
        "Martinu T, Menzies D, Dial S. Re-evaluation of acid-base "
        "prediction rules in patients with chronic respiratory acidosis. Can Respir J 2003;10:311-5.",
        "from memory",
    ),
    "adrogue1998": _r(
        "Adrogue & Madias 1998",
        "Adrogue HJ, Madias NE. Management of life-threatening acid-base "
        "disorders. N Engl J Med 1998;338:26-34 and 107-11.",
        "from memory",
    ),
    "schlichtig1998": _r(
        "Schlichtig, Grogono & Severinghaus 1998",
        "Schlichtig R, Grogono AW, Severinghaus JW. "
        "Human PaCO2 and standard base excess compensation for acid-base imbalance. Crit Care Med "
        "1998;26:1173-9 (coefficients from memory).",
        "from memory",
    ),
    "berend2018": _r(
        "Berend 2018",
        "Berend K. Diagnostic use of base excess in acid-base disorders. N Engl J Med 2018;378:1419-28.",
        "from memory",
    ),
    "figge1998": _r(
        "Figge, Jabor, Kazda & Fencl 1998",
        "Figge J, Jabor A, Kazda A, Fencl V. Anion gap and hypoalbuminemia. Crit Care Med 1998;26:1807-10.",
    ),
    "kraut2007": _r(
        "Kraut & Madias 2007",
        "Kraut JA, Madias NE. Serum anion gap: its uses and limitations in "
        "clinical medicine. Clin J Am Soc Nephrol 2007;2:162-74 (definitions table).",
        "from memory",
    ),
    "oh1977": _r(
        "Oh & Carroll 1977", "Oh MS, Carroll HJ. The anion gap. N Engl J Med 1977;297:814-7.", "from memory"
    ),
    "ccjm_osmol": _r(
        "Cleveland Clinic J Med, osmol gap",
        "Increasing diagnostic utility of the osmol gap. "
        "Cleve Clin J Med (box: calculated osmolality 2Na + glucose + urea).",
    ),
    "stewart1983": _r(
        "Stewart 1983",
        "Stewart PA. Modern quantitative acid-base chemistry. Can J Physiol Pharmacol 1983;61:1444-61.",
    ),
    "figge1992": _r(
        "Figge, Mydosh & Fencl 1992",
        "Figge J, Mydosh T, Fencl V. Serum proteins and acid-base "
        "equilibria: a follow-up. J Lab Clin Med 1992;120:713-9 (albumin and phosphate charge terms).",
        "from memory",
    ),
    "kellum1995": _r(
        "Kellum, Kramer & Pinsky 1995",
        "Kellum JA, Kramer DJ, Pinsky MR. Strong ion gap: a "
        "methodology for exploring unexplained anions. J Crit Care 1995;10:51-5.",
        "from memory",
    ),
    "story2004": _r(
        "Story, Morimatsu & Bellomo 2004",
        "Story DA, Morimatsu H, Bellomo R. Strong ions, weak acids "
        "and base excess: a simplified Fencl-Stewart approach to clinical acid-base disorders. Br J "
        "Anaesth 2004;92:54-60.",
        "from memory",
    ),
    "story2016": _r(
        "Story 2016",
        "Story DA. Stewart acid-base: a simplified bedside approach. Anesth Analg 2016;123:511-5.",
    ),
    # oxygenation
    "alveolar_gas_1946": _r(
        "Alveolar gas equation (Fenn, Rahn & Otis 1946; Riley & Cournand)",
        "Fenn WO, Rahn H, "
        "Otis AB. A theoretical study of the composition of the alveolar air at altitude. Am J "
        "Physiol 1946;146:637-53 (authorship from memory; equation form verified).",
        "from memory",
    ),
    "aa_age_rule": _r(
        "A-a gradient by age (age/4 + 4)",
        "Upper limit of the A-a gradient breathing air: age/4 + 4 mmHg.",
        "common practice",
    ),
    "mellemgaard1966": _r(
        "Mellemgaard 1966",
        "Mellemgaard K. The alveolar-arterial oxygen difference: its size and "
        "components in normal man. Acta Physiol Scand 1966;67:10-20.",
        "from memory",
    ),
    "sorbini1968": _r(
        "Sorbini et al. 1968",
        "Sorbini CA, Grassi V, Solinas E, Muiesan G. Arterial oxygen tension "
        "in relation to age in healthy subjects. Respiration 1968;25:3-13.",
        "from memory",
    ),
    "cerveri1995": _r(
        "Cerveri et al. 1995",
        "Cerveri I, Zoia MC, Fanfulla F, et al. Reference values of arterial "
        "oxygen tension in the middle-aged and elderly. Am J Respir Crit Care Med 1995;152:934-41.",
    ),
    "berlin2012": _r(
        "ARDS Definition Task Force 2012",
        "ARDS Definition Task Force. Acute respiratory distress "
        "syndrome: the Berlin Definition. JAMA 2012;307:2526-33.",
    ),
    "rice2007": _r(
        "Rice et al. 2007",
        "Rice TW, Wheeler AP, Bernard GR, et al. Comparison of the SpO2/FiO2 ratio "
        "and the PaO2/FiO2 ratio in patients with acute lung injury or ARDS. Chest 2007;132:410-7.",
    ),
    "chen2018_oi": _r(
        "Chen et al. 2018",
        "Oxygenation index FiO2 x mean airway pressure x 100 / PaO2. J Clin Med 2018 (formula as used).",
    ),
    "dijkhuizen1977": _r(
        "Dijkhuizen et al. 1977",
        "Dijkhuizen P, Buursma A, Fongers TME, et al. The oxygen binding "
        "capacity of human haemoglobin. Pflugers Arch 1977;369:223-31.",
    ),
    "o2_content": _r(
        "Oxygen content equation",
        "CaO2 = Hufner factor x Hb x SaO2 + 0.0031 x PaO2 (standard "
        "physiology; dissolved coefficient 0.003-0.0031 mL/dL/mmHg).",
        "common practice",
    ),
    "severinghaus1979": _r(
        "Severinghaus 1979",
        "Severinghaus JW. Simple, accurate equations for human blood O2 "
        "dissociation computations. J Appl Physiol 1979;46:599-602.",
    ),
    "kelman1966": _r(
        "Kelman 1966",
        "Kelman GR. Digital computer subroutine for the conversion of oxygen tension "
        "into saturation. J Appl Physiol 1966;21:1375-6.",
        "from memory",
    ),
    "severinghaus1966": _r(
        "Severinghaus 1966",
        "Severinghaus JW. Blood gas calculator. J Appl Physiol "
        "1966;21:1108-16 (BE term also in Inaba et al. Jpn J Physiol 1986;36:163).",
        "from memory",
    ),
    # ventilation
    "alveolar_ventilation": _r(
        "Alveolar ventilation equation",
        "PaCO2 = 0.863 x VCO2 / VA (STPD to BTPS "
        "derivation; e.g. West JB, Respiratory Physiology: The Essentials).",
        "common practice",
    ),
    "tusman2012": _r(
        "Tusman, Sipmann & Bohm 2012",
        "Tusman G, Sipmann FS, Bohm SH. Rationale of dead space "
        "measurement by volumetric capnography. Anesth Analg 2012;114:866-74.",
    ),
    "numa1996": _r(
        "Numa & Newth 1996",
        "Numa AH, Newth CJL. Anatomic dead space in infants and children. J Appl Physiol 1996;80:1485-9.",
    ),
    "ardsnet2000": _r(
        "ARDS Network 2000",
        "The Acute Respiratory Distress Syndrome Network. Ventilation with lower "
        "tidal volumes as compared with traditional tidal volumes for acute lung injury and ARDS. "
        "N Engl J Med 2000;342:1301-8 (PBW formulas).",
    ),
    "fever_vco2": _r(
        "Metabolic rate and fever (10-13 % per degC)",
        "Oxygen consumption rises about 10-13 % per "
        "degC of fever (sports-medicine chapter 2017: 13 %; evolution-medicine review: 10-12.5 %).",
    ),
    # temperature
    "rosenthal1948": _r(
        "Rosenthal 1948",
        "Rosenthal TB. The effect of temperature on the pH of blood and plasma in "
        "vitro. J Biol Chem 1948;173:25-30.",
    ),
    "bradley1956": _r(
        "Bradley, Severinghaus & Stupfel 1956",
        "Bradley AF, Severinghaus JW, Stupfel M. Effect of "
        "temperature on PCO2 and PO2 of blood in vitro. J Appl Physiol 1956;9:201-4.",
    ),
    # altitude and transport
    "icao7488": _r(
        "ICAO standard atmosphere (Doc 7488/3)",
        "ICAO. Manual of the ICAO Standard Atmosphere, Doc "
        "7488/3, 1993 (identical to ISO 2533); constants as US Standard Atmosphere 1976.",
    ),
    "ussa1976": _r(
        "US Standard Atmosphere 1976",
        "NOAA, NASA, USAF. U.S. Standard Atmosphere, 1976. Washington "
        "DC: US Government Printing Office, 1976.",
    ),
    "gilbert1974": _r(
        "Gilbert & Keighley 1974",
        "Gilbert R, Keighley JF. The arterial/alveolar oxygen tension "
        "ratio: an index of gas exchange applicable to varying inspired oxygen concentrations. Am Rev "
        "Respir Dis 1974;109:142-5.",
        "from memory",
    ),
    "asma2008": _r(
        "Aerospace Medical Association 2008",
        "Aerospace Medical Association. Cabin cruising altitudes "
        "for regular transport aircraft. Aviat Space Environ Med 2008;79:433-9.",
    ),
    "bts2011_air": _r(
        "BTS air travel 2011",
        "Ahmedzai S, Balfour-Lynn IM, Bewick T, et al. Managing passengers with "
        "stable respiratory disease planning air travel: BTS recommendations. Thorax 2011;66 Suppl "
        "1:i1-30.",
    ),
    "bradi2009": _r(
        "Bradi et al. 2009",
        "Bradi AC, Faughnan ME, Stanbrook MB, et al. Predicting the need for "
        "supplemental oxygen during airline flight in patients with chronic pulmonary disease. Can "
        "Respir J 2009;16:119-24.",
    ),
    "boyle": _r(
        "Boyle's law",
        "Boyle's law P1V1 = P2V2 at constant temperature; body-cavity gas saturated with "
        "water vapour at 37 degC (aviation physiology texts).",
        "common practice",
    ),
    "cylinder_ideal_gas": _r(
        "Ideal-gas cylinder contents",
        "Free gas = water capacity x gauge pressure / 1.01325 "
        "bar (ideal gas; conservative for oxygen, Z about 0.93 at 200 bar).",
        "common practice",
    ),
    "transport_reserve": _r(
        "Transport oxygen reserve",
        "Carry 1.5-2 x the oxygen calculated for the planned time "
        "and keep a reserve of about a quarter of the contents.",
        "common practice",
    ),
    # thresholds
    "bts2017_o2": _r(
        "BTS oxygen guideline 2017",
        "O'Driscoll BR, Howard LS, Earis J, Mak V. BTS guideline for "
        "oxygen use in adults in healthcare and emergency settings. Thorax 2017;72 Suppl 1:ii1-90.",
    ),
    "bts_ics2016": _r(
        "BTS/ICS guideline 2016",
        "Davidson AC, Banham S, Elliott M, et al. BTS/ICS guideline for the "
        "ventilatory management of acute hypercapnic respiratory failure in adults. Thorax 2016;71 "
        "Suppl 2:ii1-35.",
    ),
    "bts2017_clarify": _r(
        "BTS 2017 clarification",
        "Clarification of hypercapnia threshold (PaCO2 >= 6.0 kPa). Thorax 2017;72:588.",
    ),
    "resp_failure_types": _r(
        "Respiratory failure types",
        "Type 1: PaO2 < 8 kPa with normal or low PaCO2; type 2: PaO2 < 8 kPa with PaCO2 > 6.0 kPa.",
        "common practice",
    ),
    "co2_narcosis": _r(
        "CO2 and consciousness",
        "Consciousness commonly falls above a PaCO2 of about 75 mmHg in "
        "previously normal people and about 90 mmHg in chronic retainers.",
        "common practice",
    ),
    "consistency_band": _r(
        "Consistency band 0.03 pH",
        "A reported triple is flagged when the pH computed from PCO2 "
        "and HCO3 differs from the reported pH by more than 0.03.",
        "common practice",
    ),
    "fraction_acute_bands": _r(
        "Fraction-acute interpolation",
        "Interpolating between the acute and chronic compensation rules; bands >= 0.8 acute, <= 0.2 chronic.",
        "common practice",
    ),
    # -- additions: acid-base and blood gas (keep this line: it is an edit anchor) --
    # -- additions: oxygenation, ventilation, temperature (keep this line: it is an edit anchor) --
    # -- additions: altitude and transport (keep this line: it is an edit anchor) --
    # -- additions: shell, uncertainty, other (keep this line: it is an edit anchor) --
}


def cite(key: str) -> str:
    """Short citation for a reference key (raises ``KeyError`` for an unknown key).

    >>> cite("albert1967")
    'Albert, Dell & Winters 1967'
    """
    return REFERENCES[key].short


def full(key: str) -> str:
    """Full citation for a reference key."""
    return REFERENCES[key].full
