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
    "wrenn1990": _r(
        "Wrenn 1990",
        "Wrenn K. The delta (delta) gap: an approach to mixed acid-base disorders. Ann Emerg Med "
        "1990;19:1310-3.",
    ),
    "rastegar2007": _r(
        "Rastegar 2007",
        "Rastegar A. Use of the DeltaAG/DeltaHCO3- ratio in the diagnosis of mixed acid-base disorders. J Am "
        "Soc Nephrol 2007;18:2429-31.",
    ),
    "cohen_woods1976": _r(
        "Cohen & Woods 1976",
        "Cohen RD, Woods HF. Clinical and Biochemical Aspects of Lactic Acidosis. Oxford: Blackwell, 1976 "
        "(lactic acidosis: lactate above about 4-5 mmol/L with acidaemia).",
        "from memory",
    ),
    "lactate_beside_hypercapnia": _r(
        "Metabolic acidosis beside hypercapnia",
        "Beside an acidaemic respiratory acidosis a lactate of 4 mmol/L or more, or an (albumin-corrected) "
        "anion gap above 16 mmol/L, names a concurrent metabolic acidosis whatever the HCO3.",
        "common practice",
    ),
    "pco2_aim": _r(
        "PaCO2 aim in hypercapnia",
        "P(x) = PaCO2 x 10^(pH - x), the PaCO2 that gives pH x at today's buffer state (Henderson-"
        "Hasselbalch): while pH < 7.35 aim for the lower of P(7.35) and the usual PaCO2; while pH >= 7.35 "
        "the present (or a lower known usual) PaCO2; Winters' centre with a primary metabolic acidosis; "
        "never below P(7.45) nor above the present PaCO2.",
        "common practice",
    ),
    "venous_gas": _r(
        "Venous blood gases",
        "Byrne AL, Bennett M, Chatterji R, et al. Peripheral venous and arterial blood gas analysis in "
        "adults: are they comparable? A systematic review and meta-analysis. Respirology 2014;19:168-75; "
        "Kelly AM. Can venous blood gas analysis replace arterial in emergency medical care? Emerg Med "
        "Australas 2010;22:493-8 (venous PCO2 about 4-6 mmHg above arterial; a venous PCO2 <= 45 mmHg makes "
        "arterial hypercapnia unlikely).",
        "from memory",
    ),
    "fio2_assumed_air": _r(
        "FiO2 not recorded",
        "An oxygenation statement without a recorded FiO2 says that air was assumed; a PaO2 above the "
        "alveolar PO2 on air means oxygen was given.",
        "common practice",
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
    "gabow1980": _r(
        "Gabow et al. 1980",
        "Gabow PA, Kaehny WD, Fennessey PV, Goodman SI, Gross PA, Schrier RW. Diagnostic importance of an "
        "increased serum anion gap. N Engl J Med 1980;303:854-8 (an anion gap above about 20 mmol/L points "
        "to a metabolic acidosis whatever the HCO3).",
        "from memory",
    ),
    "acid_base_normal_ranges": _r(
        "Normal arterial acid-base values",
        "pH 7.35-7.45, PaCO2 35-45 mmHg (4.7-6.0 kPa), HCO3 22-26 mmol/L, SBE -2 to +2 (some texts -3 to "
        "+3), anion gap about 12 mmol/L, albumin 4.0 g/dL.",
        "common practice",
    ),
    "ph_severity": _r(
        "Severe acidaemia / alkalaemia",
        "Severe acidaemia pH below 7.20; severe alkalaemia pH above 7.60 (bedside thresholds).",
        "common practice",
    ),
    "compensation_timing": _r(
        "Time course and limits of compensation",
        "Respiratory compensation takes 12-24 h and renal compensation 3-5 days; compensation rarely returns "
        "the pH to normal in a simple disorder, chronic respiratory alkalosis excepted.",
        "common practice",
    ),
    "posthypercapnic_alkalosis": _r(
        "Post-hypercapnic metabolic alkalosis",
        "In chronic hypercapnia the kidneys retain HCO3 over days; lowering the PaCO2 quickly below the "
        "patient's usual level leaves that HCO3 unopposed and the blood alkalaemic (post-hypercapnic "
        "metabolic alkalosis), so ventilation aims at the patient's baseline PaCO2, not at 40 mmHg.",
        "common practice",
    ),
    "sample_site_caveats": _r(
        "Venous and capillary samples",
        "Venous pH and HCO3 track arterial values closely (venous pH slightly lower, PCO2 higher); a normal "
        "venous PCO2 makes arterial hypercapnia unlikely but a raised one does not measure it; venous PO2 "
        "says nothing about oxygenation; arterialised capillary pH and PCO2 approximate arterial values "
        "while capillary PO2 underestimates arterial PO2.",
        "common practice",
    ),
    "stewart_typical_values": _r(
        "Typical adult values assumed for missing Stewart terms",
        "Ionised calcium 1.2 mmol/L, magnesium 0.9 mmol/L, phosphate 1.0 mmol/L (mid reference ranges), "
        "used only when not measured and always named in the report.",
        "common practice",
    ),
    "tidewell_acid_base_conventions": _r(
        "Tidewell interpretation conventions",
        "Conventions of the Tidewell blood_gas interpretation (docs/glossary/acidbase.md): a compensation "
        "band is widened by max(2 mmol/L, 0.2 x the acute-chronic span) before a second disorder is named; "
        "the larger log-ratio contribution to [H+] names the primary process; SBE readings use +/- 3 mmol/L.",
        "common practice",
    ),
    # -- additions: acid-base and blood gas (keep this line: it is an edit anchor) --
    "buck1981": _r(
        "Buck 1981",
        "Buck AL. New equations for computing vapor pressure and enhancement factor. J Appl Meteorol "
        "1981;20:1527-32 (eq 3 over liquid water, e = 6.1121 exp(17.502 T / (240.97 + T)) hPa; "
        "coefficients verified in a public package's documentation citing Buck eq 3).",
    ),
    "hill1910": _r(
        "Hill 1910",
        "Hill AV. The possible effects of the aggregation of the molecules of haemoglobin on its "
        "dissociation curves. J Physiol 1910;40:iv-vii (Hill equation; n 2.7, P50 26.8 mmHg as used here).",
        "from memory",
    ),
    "jette1990_met": _r(
        "Jette, Sidney & Blumchen 1990 (1 MET)",
        "Jette M, Sidney K, Blumchen G. Metabolic equivalents (METS) in exercise testing, exercise "
        "prescription, and evaluation of functional capacity. Clin Cardiol 1990;13:555-65 "
        "(1 MET = 3.5 mL O2/kg/min; x R 0.8 gives a resting VCO2 of 2.8 mL/kg/min).",
        "from memory",
    ),
    "resting_vco2": _r(
        "Resting adult VCO2 about 200 mL/min",
        "Resting adult CO2 output about 200 mL/min (VO2 about 250 mL/min, R 0.8); standard "
        "respiratory-physiology teaching, e.g. West JB, Respiratory Physiology: The Essentials.",
        "from memory",
    ),
    "enghoff1938": _r(
        "Enghoff 1938",
        "Enghoff H. Volumen inefficax. Bemerkungen zur Frage des schadlichen Raumes. Upsala "
        "Lakareforen Forh 1938;44:191-218 (Bohr equation with arterial PCO2).",
        "from memory",
    ),
    "bohr1891": _r(
        "Bohr 1891",
        "Bohr C. Ueber die Lungenathmung. Skand Arch Physiol 1891;2:236-68 (dead space from mixed "
        "expired and alveolar CO2).",
        "from memory",
    ),
    "nunn1960": _r(
        "Nunn & Hill 1960",
        "Nunn JF, Hill DW. Respiratory dead space and arterial to end-tidal CO2 tension difference in "
        "anesthetized man. J Appl Physiol 1960;15:383-9 (physiological VD about 0.3 VT; authorship "
        "from memory, values verified in the abstract).",
    ),
    "normal_ventilation": _r(
        "Normal resting minute ventilation 5-8 L/min",
        "Resting adult minute ventilation 5-8 L/min; normal VD/VT 0.2-0.35.",
        "common practice",
    ),
    "pco2_normal_range": _r(
        "Normal PaCO2 35-45 mmHg",
        "Normal arterial PCO2 35-45 mmHg (4.7-6.0 kPa); hypercapnia above 45 mmHg (6.0 kPa).",
    ),
    "expiratory_time": _r(
        "Expiratory time from RR and I:E",
        "Te = (60 / RR) x E / (I + E); complete passive expiration needs about 3 expiratory time "
        "constants (R x C), so a short Te risks gas trapping (auto-PEEP) in obstructive disease.",
        "common practice",
    ),
    "to_target_pco2": _r(
        "Ventilator change to a target PaCO2",
        "With CO2 output constant, alveolar ventilation scales as PaCO2 now / PaCO2 target "
        "(alveolar ventilation equation); VE scaled the same way assumes VD/VT unchanged.",
        "common practice",
    ),
    "co2_log_shares": _r(
        "Tidewell log decomposition of the CO2 excess",
        "Derived here from the alveolar ventilation equation PaCO2 = 0.863 VCO2 / (VE (1 - VD/VT)): "
        "ln(PaCO2 / PaCO2ref) is the exact sum of ln(VCO2 / VCO2ref), ln(VEref / VE) and "
        "ln((1 - VD/VTref) / (1 - VD/VT)); not a published method.",
        "common practice",
    ),
    "etco2_gradient": _r(
        "Constant PaCO2-EtCO2 gradient",
        "Tracking PaCO2 from EtCO2 assumes the arterial-to-end-tidal gradient stays constant; it "
        "changes with dead space, cardiac output and position (normal about 2-5 mmHg).",
        "common practice",
    ),
    "alpha_ph_stat": _r(
        "Alpha-stat and pH-stat",
        "Alpha-stat management interprets uncorrected 37 degC values; pH-stat aims at pH 7.40 and "
        "PaCO2 40 mmHg at the patient's temperature (temperature-corrected values).",
        "common practice",
    ),
    # -- additions: oxygenation, ventilation, temperature (keep this line: it is an edit anchor) --
    "aviation_o2_equivalence": _r(
        "Aviation-medicine chapter (8,000 ft ~ 15.1 % O2)",
        "Aviation-medicine book chapter (Taylor & Francis): a cabin altitude of 8,000 ft is equivalent "
        "to breathing about 15.1 % oxygen at sea level, and a healthy PaO2 falls to about 8.7 kPa "
        "(as summarised in the project's docs).",
    ),
    "bts2011_inflight_threshold": _r(
        "BTS 2011 in-flight oxygen threshold (from memory)",
        "Ahmedzai S, et al. BTS recommendations for air travel. Thorax 2011;66 Suppl 1:i1-30: in-flight "
        "oxygen advised when the hypoxic-challenge PaO2 is below 6.6 kPa (about 50 mmHg) or SpO2 below "
        "85 % (threshold recalled, not re-read).",
        "from memory",
    ),
    "air_o2_fraction": _r(
        "O2 fraction of dry air 0.2095",
        "Dry air contains 20.95 % oxygen by volume (US Standard Atmosphere 1976 sea-level composition "
        "20.946 %; recalled, not re-read).",
        "from memory",
    ),
    "coolprop2014": _r(
        "CoolProp (Bell et al. 2014)",
        "Bell IH, Wronski J, Quoilin S, Lemort V. Pure and pseudo-pure fluid thermophysical property "
        "evaluation and the open-source thermophysical property library CoolProp. Ind Eng Chem Res "
        "2014;53:2498-508 (oxygen Z about 0.931 at 137-200 bar and 0.939 at 230 bar, 15 degC, as "
        "computed for Tidewell's cylinder rules; citation details from memory).",
        "from memory",
    ),
    "ventilator_o2_estimate": _r(
        "Ventilator oxygen use (mixing balance + device allowance)",
        "O2 drawn = VE x (FiO2 - 0.2095) / (1 - 0.2095) + a device allowance (bias/trigger flow, leaks; "
        "driving gas of pneumatic ventilators from the device manual).",
        "common practice",
    ),
    "trapped_gas_practice": _r(
        "Trapped gas in flight (cuffs, pneumothorax)",
        "Air-filled tube cuffs gain pressure on ascent (check cuff pressure after climb and on descent, "
        "or fill with saline per local practice); an undrained pneumothorax enlarges at altitude.",
        "common practice",
    ),
    "fio2_altitude_rules": _r(
        "FiO2 at altitude: (PB - 47) ratio and PB ratio",
        "FiO2_alt = FiO2_ground x (PB_ground - 47) / (PB_alt - 47) keeps the inspired PO2 (follows from "
        "equal PIO2; water-vapour-corrected PIO2 as in an Arch Dis Child altitude table footnote); the "
        "simple rule FiO2_ground x PB_ground / PB_alt is the bedside shortcut.",
        "common practice",
    ),
    # -- additions: altitude and transport (keep this line: it is an edit anchor) --
    "jcgm101_2008": _r(
        "JCGM 101:2008 (GUM Supplement 1)",
        "Joint Committee for Guides in Metrology. JCGM 101:2008. Evaluation of measurement data - "
        "Supplement 1 to the Guide to the expression of uncertainty in measurement - Propagation of "
        "distributions using a Monte Carlo method. BIPM, 2008 (draws from the input distributions, each "
        "propagated through the model; coverage interval from the 2.5th and 97.5th percentiles).",
        "from memory",
    ),
    "analyser_imprecision": _r(
        "Typical analyser imprecision (1 SD)",
        "Typical between-run imprecision of blood-gas and point-of-care chemistry analysers, as 1 SD or "
        "CV: pH 0.01; PCO2 3 %; PO2 4 %; Na 1.5, K 0.1, Cl 1.5 mmol/L; albumin 4 %; lactate 5 %; glucose "
        "3 %; urea 4 %; phosphate 4 %; osmolality 3 mOsm/kg; Hb 2 %; ionised Ca 2 %; Mg 4 %; pulse "
        "oximeter SpO2 2 % (ISO 80601-2-61 accuracy limit 4 % root-mean-square, from memory); "
        "thermometer 0.2 degC. Each laboratory states its own: use those where known.",
        "common practice",
    ),
    # course of a patient (serial gases)
    "austin2010": _r(
        "Austin et al. 2010",
        "Austin MA, Wills KE, Blizzard L, Walters EH, Wood-Baker R. Effect of high flow oxygen on mortality "
        "in chronic obstructive pulmonary disease patients in prehospital setting: randomised controlled "
        "trial. "
        "BMJ 2010;341:c5462 (titrated oxygen to SpO2 88-92 % against high-flow oxygen; high-flow oxygen "
        "raised PaCO2 and lowered pH).",
    ),
    "bts_ics2016_niv_monitoring": _r(
        "BTS/ICS guideline 2016 (NIV monitoring)",
        "Davidson AC, Banham S, Elliott M, et al. BTS/ICS guideline for the ventilatory management of acute "
        "hypercapnic respiratory failure in adults. Thorax 2016;71 Suppl 2:ii1-35: a gas 1-2 h after NIV "
        "starts and about 1 h after a change of settings; no improvement in pH by 4-6 h prompts the team to "
        "consider escalation within the agreed ceiling of treatment (intervals from memory).",
        "from memory",
    ),
    "reference_change_value": _r(
        "Reference change value (Fraser)",
        "Fraser CG. Biological Variation: From Principles to Practice. Washington DC: AACC Press; 2001: the "
        "difference between two results that exceeds measurement variation, RCV = 1.96 x sqrt(2) x SD "
        "(analytical SD only for a gas, where biological variation is the signal).",
        "from memory",
    ),
    "tidewell_course_conventions": _r(
        "Tidewell course conventions",
        "How Tidewell reads a course of gases (docs/course.md): changes below the reference change count as "
        "none; venous gases are compared only with venous ones; a verdict says worsening first, then "
        "improving, else not improving; the PCO2 rate is the change divided by the hours between two gases.",
        "common practice",
    ),
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
