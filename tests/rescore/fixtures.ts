/**
 * A small hand-built base release for the rescore tests: ordinary clinical wording in a compact
 * spec (see tests/helpers/releases.ts), enough concepts for the scorer to learn from.
 */
export const BASE = `
B01 disorder: Asthma* | Bronchial asthma | Reactive airway disease
B02 disorder: Gout* | Podagra | Gouty arthritis
B03 disorder: Essential hypertension* | Primary hypertension | High blood pressure
B04 disorder: Type 2 diabetes mellitus* | Adult-onset diabetes | Non-insulin-dependent diabetes
B05 disorder: Chronic obstructive pulmonary disease* | COPD | Chronic obstructive lung disease
B06 disorder: Pneumonia* | Lung infection | Pneumonitis due to infection
B07 disorder: Appendicitis* | Inflammation of appendix
B08 disorder: Cholelithiasis* | Gallstones | Gall stone disease
B09 disorder: Iron deficiency anaemia* | Sideropenic anaemia | Anaemia due to iron deficiency
B10 disorder: Urinary tract infection* | UTI | Infection of urinary tract
B11 disorder: Atrial fibrillation* | AF | Auricular fibrillation
B12 disorder: Heart failure* | Cardiac failure | Congestive heart failure
B13 disorder: Osteoarthritis* | Degenerative joint disease | Osteoarthrosis
B14 disorder: Rheumatoid arthritis* | Rheumatoid disease | Atrophic arthritis
B15 disorder: Psoriasis* | Psoriasis vulgaris | Plaque psoriasis
B16 disorder: Eczema* | Atopic dermatitis | Atopic eczema
B17 disorder: Hypothyroidism* | Underactive thyroid | Thyroid deficiency
B18 disorder: Hyperthyroidism* | Overactive thyroid | Thyrotoxicosis
B19 disorder: Epilepsy* | Seizure disorder | Epileptic fits
B20 disorder: Parkinson disease* | Paralysis agitans | Parkinsonism, primary
B21 finding: Headache* | Cephalalgia | Head pain
B22 finding: Cough* | Coughing | Tussis
B23 finding: Fever* | Pyrexia | High temperature
B24 finding: Nausea* | Feeling sick | Queasiness
B25 finding: Fatigue* | Tiredness | Lack of energy
B26 finding: Dizziness* | Giddiness | Light-headedness
B27 procedure: Appendectomy* | Removal of appendix | Appendicectomy
B28 procedure: Cholecystectomy* | Removal of gallbladder | Gallbladder excision
B29 procedure: Hip replacement* | Total hip arthroplasty | Replacement of hip joint
B30 procedure: Tonsillectomy* | Removal of tonsils | Excision of tonsils
B31 lab test: Haemoglobin measurement* | Hb level | Hemoglobin concentration
B32 lab test: Serum creatinine* | Creatinine level | Plasma creatinine
B33 lab test: Blood glucose measurement* | Glucose level | Blood sugar
B34 lab test: Serum potassium* | Potassium level | Plasma potassium
B35 lab test: Thyroid stimulating hormone level* | TSH | Thyrotropin level
B36 lab test: C-reactive protein* | CRP | CRP level
`;

export const BASE_HIERARCHY = `
B01 < G1
B05 < G1
B06 < G1
B07 < G2
B08 < G2
B21 < G3
B22 < G3
`;
