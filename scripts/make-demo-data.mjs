#!/usr/bin/env node
/**
 * make-demo-data: build the invented demo scenario in demo-data/.
 *
 * Everything written here is fiction: the "Quillmere Clinical Vocabulary" (QCV), its three
 * releases r1, r2, r3, and the local code list of "Fenwick Hollow General Hospital". The terms
 * were written for this script; no identifier or row comes from a real terminology.
 *
 * How it works: release r1 is parsed from the CONCEPTS table below. r2 is a copy of r1 to which
 * the scripted edits of `buildR2` are applied, and r3 likewise from r2. Each scripted edit
 * records the row it contributes to the expectation table (expected-changes-*.tsv), so the
 * expectations are written once, next to the edit that makes them true. The mapping list and
 * the reviewer's verdicts are written by hand in MAPPINGS.
 *
 * After writing, the files are read back from disk and checked on their own terms (one
 * preferred term per concept and language, term_id stability, that every expected change
 * holds in the data, that concepts not named by any change are unchanged, and so on). The
 * script exits non-zero if any check fails. `--check` only runs the checks.
 *
 * Deterministic: a fixed-seed PRNG, no clock, no environment. Plain Node, no dependencies.
 *   node scripts/make-demo-data.mjs          # rebuild and check
 *   node scripts/make-demo-data.mjs --check  # check the committed files
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const OUT = join(dirname(fileURLToPath(import.meta.url)), '..', 'demo-data');

// ---------------------------------------------------------------------------------------------
// Identifiers
// ---------------------------------------------------------------------------------------------

/** Check-letter alphabet: 23 capitals, without I, O and Q (easily misread). */
const CHECK_ALPHABET = 'ABCDEFGHJKLMNPRSTUVWXYZ';

/**
 * Check letter over a digit string: weights n+1 … 2 from the left, sum mod 23. Because 23 is a
 * prime larger than any digit difference times weight difference here, every single-digit
 * error and every swap of two different adjacent digits changes the letter.
 */
function checkLetter(digits) {
  let sum = 0;
  for (let i = 0; i < digits.length; i++) sum += Number(digits[i]) * (digits.length - i + 1);
  return CHECK_ALPHABET[sum % 23];
}
const conceptIdOf = (n) => { const d = String(n).padStart(5, '0'); return `QV${d}${checkLetter(d)}`; };
const termIdOf = (n) => { const d = String(n).padStart(6, '0'); return `QT${d}${checkLetter(d)}`; };
const CONCEPT_ID_RE = /^QV(\d{5})([A-Z])$/;
const TERM_ID_RE = /^QT(\d{6})([A-Z])$/;
const validId = (id, re) => { const m = re.exec(id); return !!m && checkLetter(m[1]) === m[2]; };

/** mulberry32: small, well-known 32-bit PRNG; fixed seeds keep the output stable. */
function prng(seed) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
/** FNV-1a 32-bit hash of a string (used to give each local code its own usage figure). */
function fnv1a(s) {
  let h = 0x811c9dc5;
  for (let i = 0; i < s.length; i++) { h ^= s.charCodeAt(i); h = Math.imul(h, 0x01000193) >>> 0; }
  return h >>> 0;
}

/** Number allocators: one per release for concepts and one for terms, with irregular gaps. */
function allocator(start, seed, maxGap) {
  const rnd = prng(seed);
  let next = start;
  return () => { const n = next; next += 1 + Math.floor(rnd() * maxGap); return n; };
}

// ---------------------------------------------------------------------------------------------
// Release r1: the vocabulary. One line per concept:
//   key | category code | parent keys (comma-separated, - for a root) | preferred; synonym; ...
// Category codes: D disorder, F finding, P procedure, L lab test, S substance,
// B body structure, O organism.
// ---------------------------------------------------------------------------------------------

const CATEGORY = {
  D: 'disorder', F: 'finding', P: 'procedure', L: 'lab test', S: 'substance', B: 'body structure', O: 'organism',
};

const CONCEPTS = String.raw`
lab        |L|-                 |Laboratory test; Laboratory investigation; Lab test
haemtest   |L|lab               |Haematology test; Haematology investigation
chemtest   |L|lab               |Clinical chemistry test; Biochemistry test; Chemical pathology test
microtest  |L|lab               |Microbiology test; Microbiological investigation
immtest    |L|lab               |Immunology test; Immunological investigation
urinetest  |L|lab               |Urine test; Urine investigation
coagtest   |L|haemtest          |Coagulation test; Clotting test; Haemostasis test
endotest   |L|chemtest          |Endocrine test; Hormone assay
bloodgas   |L|chemtest          |Blood gas analysis; Blood gases
serotest   |L|microtest,immtest |Serology test; Serological test; Antibody serology
molec      |L|microtest         |Nucleic acid amplification test; NAAT; Molecular test; PCR test
fbc        |L|haemtest          |Full blood count; FBC; Complete blood count; CBC; Blood count
hb         |L|haemtest          |Haemoglobin measurement; Hb; Haemoglobin concentration; Hemoglobin level; Haemoglobin level
wcc        |L|haemtest          |White cell count; WCC; White blood cell count; WBC count; Leucocyte count
plt        |L|haemtest          |Platelet count; PLT; Thrombocyte count
esr        |L|haemtest          |Erythrocyte sedimentation rate; ESR; Sed rate; Sedimentation rate
film       |L|haemtest          |Blood film examination; Peripheral blood smear; Blood film; Blood smear review
sickle     |L|haemtest          |Sickle cell screening test; Sickle solubility test; Sickle screen
hbelec     |L|haemtest          |Haemoglobin electrophoresis; Hb electrophoresis; Haemoglobinopathy screen
ferritin   |L|chemtest,haemtest |Serum ferritin; Ferritin level; Ferritin, serum
b12        |L|haemtest          |Vitamin B12 level; Serum B12; B12 level
cobal      |L|chemtest          |Cobalamin measurement; Serum cobalamin; Cobalamin assay
folate     |L|haemtest          |Serum folate; Folate level; Folic acid level
bleedtime  |L|coagtest          |Bleeding time; Ivy bleeding time; Template bleeding time
inr        |L|coagtest          |International normalised ratio; INR; International normalized ratio; INR test
aptt       |L|coagtest          |Activated partial thromboplastin time; APTT; Partial thromboplastin time; PTT
ddimer     |L|coagtest          |D-dimer; D-dimer assay; Fibrin D-dimer; D dimer level
gandsave   |L|haemtest          |Group and save; G&S; Blood group and antibody screen; Type and screen
xmatch     |L|haemtest          |Crossmatch; Cross-match; Blood crossmatch; Compatibility testing
dat        |L|haemtest,immtest  |Direct antiglobulin test; DAT; Direct Coombs test
ue         |L|chemtest          |Urea and electrolytes; U&E; U and E; Renal profile; Kidney function tests
creat      |L|chemtest          |Serum creatinine; Creatinine level; Creatinine measurement; eGFR; Estimated glomerular filtration rate
na         |L|chemtest          |Serum sodium; Sodium level; Plasma sodium
k          |L|chemtest          |Serum potassium; Potassium level; Plasma potassium
urea       |L|chemtest          |Serum urea; Urea level; Blood urea nitrogen; BUN
ca         |L|chemtest          |Serum calcium; Calcium level; Total calcium; Adjusted calcium
lft        |L|chemtest          |Liver function tests; LFT; LFTs; Liver function panel; Hepatic function panel
alt        |L|chemtest          |Alanine aminotransferase; ALT; SGPT; Alanine transaminase; ALT level
alp        |L|chemtest          |Alkaline phosphatase; ALP; Alk phos; Alkaline phosphatase level
bili       |L|chemtest          |Total bilirubin; Bilirubin level; Serum bilirubin; Bilirubin, total
crp        |L|chemtest,immtest  |C-reactive protein; CRP; CRP Level; Serum C-reactive protein
pct        |L|chemtest          |Procalcitonin; PCT; Serum procalcitonin
amyl       |L|chemtest          |Serum amylase; Amylase level; Amylase, serum
acp        |L|chemtest          |Acid phosphatase measurement; Serum acid phosphatase; Acid phosphatase, serum; ACP level
ck         |L|chemtest          |Creatine kinase; CK; CPK; Creatine phosphokinase; Creatine kinase, serum
trop       |L|chemtest          |Troponin T; Troponin T level; cTnT; Cardiac troponin T
hstrop     |L|chemtest          |High-sensitivity troponin I; hs-TnI; High sensitivity troponin I level
bnp        |L|chemtest          |N-terminal pro B-type natriuretic peptide; NT-proBNP; NTproBNP; Pro-BNP
lipid      |L|chemtest          |Lipid profile; Lipid panel; Fasting lipids; Cholesterol panel
chol       |L|chemtest          |Total cholesterol; Serum cholesterol; Cholesterol level
trig       |L|chemtest          |Triglycerides; Serum triglycerides; Triglyceride level
glu        |L|chemtest          |Blood glucose; Glucose level; Plasma glucose; Random glucose
ogtt       |L|chemtest          |Oral glucose tolerance test; OGTT; Glucose tolerance test; GTT
hba1c      |L|chemtest,endotest |Glycated haemoglobin; HbA1c; Haemoglobin A1c; Glycosylated haemoglobin; A1C
fruct      |L|chemtest          |Fructosamine; Serum fructosamine; Fructosamine level
lact       |L|chemtest          |Lactate; Blood lactate; Lactic acid level; Plasma lactate
iron       |L|chemtest          |Serum iron; Iron level; Iron, serum
vitd       |L|chemtest          |Vitamin D level; 25-hydroxyvitamin D; 25-OH vitamin D; Vit D
paracet    |L|chemtest          |Paracetamol level; Serum paracetamol; Acetaminophen level; Paracetamol assay
etoh       |L|chemtest          |Blood alcohol; Ethanol level; Serum ethanol; Blood alcohol level
thymol     |L|chemtest          |Thymol turbidity test; Thymol turbidity
psa        |L|chemtest          |Prostate specific antigen; PSA; Total PSA; PSA level
hcg        |L|chemtest,endotest |Serum hCG; Beta hCG; Quantitative hCG; Human chorionic gonadotrophin
tft        |L|endotest          |Thyroid function tests; TFT; TFTs; Thyroid panel
tsh        |L|endotest          |Thyroid stimulating hormone; TSH; Thyrotropin level; TSH level
ft4        |L|endotest          |Free thyroxine; Free T4; FT4
udip       |L|urinetest         |Urine dipstick; Urinalysis; Urine dip; Dipstick urinalysis; Reagent strip urinalysis
umicro     |L|urinetest         |Urine microscopy; Microscopic urinalysis; Urine sediment examination
uacr       |L|urinetest         |Urine albumin to creatinine ratio; ACR; Urine ACR; Albumin creatinine ratio
upreg      |L|urinetest,endotest|Urine pregnancy test; Urine hCG; Pregnancy test, urine; UPT
udrug      |L|urinetest         |Urine drug screen; Urine toxicology screen; UDS; Drugs of abuse screen, urine
bc         |L|microtest         |Blood culture; Blood cultures; Blood culture set
uc         |L|microtest,urinetest|Urine culture; Urine MC&S; Urine culture and sensitivity; MSU culture
sput       |L|microtest         |Sputum culture; Sputum MC&S; Culture of sputum; Sputum microscopy, culture and sensitivity
sputr      |L|microtest         |Sputum culture, routine; Routine sputum culture; Routine bacterial culture of sputum
wound      |L|microtest         |Wound swab culture; Wound swab; Wound MC&S; Culture of wound swab
stool      |L|microtest         |Faeces culture; Stool culture; Stool MC&S; Faecal culture; Stool for culture
cdiff      |L|microtest         |Clostridioides difficile toxin test; C. difficile toxin; C diff toxin; CDT test
mrsa       |L|microtest         |MRSA screen; MRSA screening swab; Methicillin-resistant Staphylococcus aureus screen
covidpcr   |L|molec             |SARS-CoV-2 RNA test; SARS-CoV-2 PCR; COVID-19 PCR; Coronavirus nucleic acid test
flupcr     |L|molec             |Influenza A and B RNA test; Flu PCR; Influenza PCR; Influenza virus nucleic acid test
igra       |L|immtest           |Interferon-gamma release assay; IGRA; TB interferon-gamma test; Tuberculosis blood test
hbsag      |L|serotest          |Hepatitis B surface antigen; HBsAg; Hep B surface antigen; HBsAg test
hivag      |L|serotest          |HIV antigen and antibody test; HIV Ag/Ab; HIV test; HIV combination test
ebv        |L|serotest          |Epstein-Barr virus serology; EBV serology; Glandular fever screen; Heterophile antibody test
ana        |L|immtest           |Antinuclear antibody; ANA; ANA screen; Antinuclear antibodies
rf         |L|immtest           |Rheumatoid factor; RF; Rheumatoid factor level
ttg        |L|immtest           |Tissue transglutaminase antibody; tTG IgA; Anti-tTG; Coeliac serology
abg        |L|bloodgas          |Arterial blood gas; ABG; Arterial blood gases; ABGs
vbg        |L|bloodgas          |Venous blood gas; VBG; Venous gas

dis        |D|-                 |Disorder; Disease
cvd        |D|dis               |Cardiovascular disorder; Disorder of cardiovascular system; Cardiovascular disease
respd      |D|dis               |Respiratory disorder; Disorder of respiratory system; Lung disease
gid        |D|dis               |Digestive system disorder; Gastrointestinal disorder; GI disorder
endod      |D|dis               |Endocrine disorder; Metabolic and endocrine disorder; Disorder of endocrine system
renald     |D|dis               |Genitourinary disorder; Disorder of genitourinary system; Urogenital disorder
neurod     |D|dis               |Nervous system disorder; Neurological disorder; Neurological disease
mskd       |D|dis               |Musculoskeletal disorder; Disorder of musculoskeletal system
infd       |D|dis               |Infectious disease; Infection; Infectious disorder
mentd      |D|dis               |Mental disorder; Psychiatric disorder; Mental health condition
haemd      |D|dis               |Blood disorder; Haematological disorder; Disorder of blood
skind      |D|dis               |Skin disorder; Dermatological disorder; Disorder of skin
injury     |D|dis               |Injury; Traumatic injury; Trauma
neopl      |D|dis               |Neoplastic disease; Neoplasm; Tumour
allergy    |D|dis               |Allergic condition; Allergy; Hypersensitivity disorder
eyed       |D|dis               |Eye disorder; Disorder of eye; Ophthalmic disorder
obsd       |D|dis               |Pregnancy-related disorder; Obstetric disorder; Complication of pregnancy
respinf    |D|respd,infd        |Respiratory tract infection; Respiratory infection; RTI
giinf      |D|gid,infd          |Gastrointestinal infection; GI infection; Enteric infection
hypert     |D|cvd               |Hypertensive disorder; High blood pressure; Hypertension; HTN
htn        |D|hypert            |Essential hypertension; Essential HTN; Idiopathic hypertension
htn2       |D|hypert            |Primary hypertension; Primary HTN; Primary arterial hypertension
ihd        |D|cvd               |Ischaemic heart disease; IHD; Coronary artery disease; CAD; Coronary heart disease
mi         |D|ihd               |Myocardial infarction; MI; Heart attack; Cardiac infarction; Infarction of heart
stemi      |D|mi                |ST elevation myocardial infarction; STEMI; ST-elevation MI
angina     |D|ihd               |Angina pectoris; Cardiac angina; Ischaemic chest pain
arrhy      |D|cvd               |Cardiac arrhythmia; Arrhythmia; Dysrhythmia; Irregular heart rhythm
af         |D|arrhy             |Atrial fibrillation; AF; AFib; Auricular fibrillation
hf         |D|cvd               |Heart failure; Cardiac failure; HF; Congestive heart failure; CCF
vte        |D|cvd               |Venous thromboembolism; VTE; Venous thromboembolic disease
dvt        |D|vte               |Deep vein thrombosis; DVT; Deep venous thrombosis; Deep vein thrombosis of leg
pe         |D|vte,respd         |Pulmonary embolism; PE; Pulmonary thromboembolism; Lung embolism
stroke     |D|cvd,neurod        |Stroke; Cerebrovascular accident; CVA; Brain attack
tia        |D|cvd,neurod        |Transient ischaemic attack; TIA; Mini-stroke; Transient cerebral ischaemia
asthma     |D|respd             |Asthma; Bronchial asthma; Asthmatic disorder
copd       |D|respd             |Chronic obstructive pulmonary disease; COPD; Chronic obstructive airways disease; COAD; Chronic obstructive lung disease
cnsld      |D|respd             |Chronic nonspecific lung disease; CNSLD; Chronic non-specific lung disease
lrti       |D|respinf           |Lower respiratory tract infection; LRTI; Chest infection; Lower respiratory infection
pneum      |D|respinf           |Pneumonia; Lung infection; Infective pneumonia
cap        |D|pneum             |Community acquired pneumonia; CAP; Community-onset pneumonia
hap        |D|pneum             |Hospital acquired pneumonia; HAP; Hospital-onset pneumonia
nosoc      |D|lrti              |Nosocomial pneumonia; Nosocomial lower respiratory infection
asppn      |D|pneum             |Aspiration pneumonia; Aspiration pneumonitis
urti       |D|respinf           |Upper respiratory tract infection; URTI; Upper respiratory infection; Common cold; Head cold; Acute coryza
acsin      |D|respinf           |Acute sinusitis; Sinus infection; Acute rhinosinusitis; Acute rhinitis; Nasal catarrh
bronchi    |D|respinf           |Acute bronchitis; Bronchitis, acute; Chest cold
pharyn     |D|respinf           |Pharyngitis; Sore throat; Acute pharyngitis
tb         |D|respinf           |Pulmonary tuberculosis; TB; Tuberculosis of lung; Pulmonary TB
covid      |D|respinf           |COVID-19; Coronavirus disease 2019; SARS-CoV-2 infection; COVID
flu        |D|respinf           |Influenza; Flu; Grippe; Influenza virus infection
gord       |D|gid               |Gastro-oesophageal reflux disease; GORD; GERD; Gastroesophageal reflux disease; Acid reflux disease
gastroent  |D|gid               |Gastroenteritis; Infectious gastroenteritis; Stomach bug; Gastro
appx       |D|gid               |Acute appendicitis; Appendicitis; Inflamed appendix
chole      |D|gid               |Acute cholecystitis; Cholecystitis, acute; Gallbladder inflammation
gallst     |D|gid               |Cholelithiasis; Gallstones; Gall stones; Biliary colic; Gallstone disease
pancr      |D|gid               |Acute pancreatitis; Pancreatitis, acute; AP
ibd        |D|gid               |Inflammatory bowel disease; IBD
crohn      |D|ibd               |Crohn's disease; Crohn disease; Regional enteritis; Regional ileitis
ucol       |D|ibd               |Ulcerative colitis; UC; Colitis ulcerosa
ibs        |D|gid               |Irritable bowel syndrome; IBS; Functional bowel disorder
spcolon    |D|gid               |Spastic colon; Irritable colon; Mucous colitis
coeliac    |D|gid               |Coeliac disease; Celiac disease; Gluten-sensitive enteropathy; Coeliac sprue
divert     |D|gid               |Diverticular disease of colon; Diverticular disease; Colonic diverticulosis; Diverticulosis; Diverticulitis of colon; Acute diverticulitis
cirrh      |D|gid               |Cirrhosis of liver; Liver cirrhosis; Hepatic cirrhosis; Cirrhosis
nafld      |D|gid               |Non-alcoholic fatty liver disease; NAFLD; Fatty liver; Hepatic steatosis
viralhep   |D|gid,infd          |Viral hepatitis; Infectious hepatitis; Hepatitis due to virus
hepc       |D|viralhep          |Chronic hepatitis C; Chronic HCV infection; Hepatitis C
dm         |D|endod             |Diabetes mellitus; DM; Diabetes; Sugar diabetes
t1dm       |D|dm                |Type 1 diabetes mellitus; T1DM; Insulin-dependent diabetes mellitus; IDDM; Juvenile diabetes
t2dm       |D|dm                |Type 2 diabetes mellitus; T2DM; Non-insulin-dependent diabetes mellitus; NIDDM; Adult-onset diabetes
dka        |D|dm                |Diabetic ketoacidosis; DKA; Ketoacidosis in diabetes
thyroid    |D|endod             |Thyroid disorder; Disorder of thyroid gland; Thyroid disease
hypo_t     |D|thyroid           |Hypothyroidism; Underactive thyroid; Myxoedema; Low thyroid function
obes       |D|endod             |Obesity; Obese; Adiposity
hypoglyc   |D|endod             |Hypoglycaemia; Low blood sugar; Hypoglycemia; Hypo
ckd        |D|renald            |Chronic renal failure; CRF; Chronic kidney failure; Chronic renal insufficiency
aki        |D|renald            |Acute kidney injury; AKI; Acute renal failure; ARF
uti        |D|renald,infd       |Urinary tract infection; UTI; Urine infection; Infection of urinary tract
cystitis   |D|uti               |Cystitis; Bladder infection; Inflammation of bladder
epil       |D|neurod            |Epilepsy; Seizure disorder; Epileptic disorder
migr       |D|neurod            |Migraine; Migraine headache; Sick headache
park       |D|neurod            |Parkinson's disease; Parkinson disease; Paralysis agitans; Idiopathic parkinsonism
dement     |D|neurod,mentd      |Dementia; Dementia syndrome; Senile dementia; Major neurocognitive disorder
alz        |D|dement            |Alzheimer's disease; Alzheimer disease; Dementia of Alzheimer type
delir      |D|mentd,neurod      |Delirium; Acute confusional state; Acute confusion
arthr      |D|mskd              |Arthritis; Arthropathy; Joint inflammation
oa         |D|arthr             |Osteoarthritis; OA; Degenerative joint disease; Osteoarthrosis
ra         |D|arthr             |Rheumatoid arthritis; RA; Rheumatoid disease
gout       |D|arthr,endod       |Gout; Gouty arthritis; Podagra; Urate arthropathy
osteop     |D|mskd              |Osteoporosis; Brittle bones; Osteoporotic bone disease
osteomal   |D|mskd              |Osteomalacia; Adult rickets; Softening of bones
sciat      |D|mskd,neurod       |Sciatica; Sciatic nerve pain; Sciatic neuralgia
sepsis     |D|infd              |Sepsis; Septicaemia; Blood poisoning; Septicemia
cell       |D|infd,skind        |Cellulitis; Phlegmon; Diffuse skin infection
cellleg    |D|cell              |Cellulitis and abscess of lower limb; Cellulitis of leg; Leg cellulitis; Abscess of leg; Lower limb abscess
shingles   |D|infd              |Herpes zoster; Shingles; Zoster
glandfev   |D|infd              |Infectious mononucleosis; Glandular fever; Mono; Kissing disease
hiv        |D|infd              |HIV infection; Human immunodeficiency virus infection; HIV disease
dep        |D|mentd             |Depressive disorder; Depression; Clinical depression; Major depression
anx        |D|mentd             |Generalised anxiety disorder; GAD; Anxiety disorder, generalised; Chronic anxiety
bipol      |D|mentd             |Manic depression; Bipolar affective disorder; Bipolar disorder; Manic-depressive illness
anaemia    |D|haemd             |Anaemia; Anemia; Low haemoglobin
ida        |D|anaemia           |Iron deficiency anaemia; IDA; Iron deficiency anemia; Anaemia due to iron deficiency
scd        |D|haemd             |Sickle cell disease; Sickle cell anaemia; SCD; HbSS disease
eczema     |D|skind             |Atopic dermatitis; Atopic eczema; Eczema; Infantile eczema
psor       |D|skind             |Psoriasis; Plaque psoriasis; Psoriasis vulgaris
urtic      |D|skind,allergy     |Urticaria; Hives; Nettle rash
presulc    |D|skind             |Pressure ulcer; Pressure sore; Bed sore; Decubitus ulcer
fracture   |D|injury,mskd       |Fracture of bone; Bone fracture; Broken bone; Fracture
fxwrist    |D|fracture          |Fracture of wrist; Wrist fracture; Distal radius fracture; Fracture of distal radius; Scaphoid fracture; Fracture of scaphoid bone
fxneckfem  |D|fracture          |Fracture of neck of femur; Hip fracture; Fractured neck of femur; NOF fracture
brca       |D|neopl             |Malignant neoplasm of breast; Breast cancer; Carcinoma of breast; Breast carcinoma
lungca     |D|neopl,respd       |Malignant neoplasm of lung; Lung cancer; Bronchogenic carcinoma; Carcinoma of lung
crc        |D|neopl,gid         |Malignant neoplasm of colon; Colon cancer; Carcinoma of colon; Bowel cancer
drugall    |D|allergy           |Drug allergy; Allergy to drug; Medication allergy
penall     |D|drugall           |Allergy to penicillin; Penicillin allergy; Penicillin hypersensitivity
nutall     |D|allergy           |Allergy to peanut; Peanut allergy; Groundnut allergy
anaph      |D|allergy           |Anaphylaxis; Anaphylactic reaction; Anaphylactic shock
cataract   |D|eyed              |Cataract; Lens opacity; Cloudy lens
preecl     |D|obsd              |Pre-eclampsia; Preeclampsia; Pre-eclamptic toxaemia

fnd        |F|-                 |Clinical finding; Finding
sympt      |F|fnd               |Symptom; Complaint; Presenting complaint
sign       |F|fnd               |Clinical sign; Sign; Physical sign
chestpain  |F|sympt             |Chest pain; Pain in chest; Thoracic pain; Angina
sob        |F|sympt             |Breathlessness; Shortness of breath; SOB; Dyspnoea; Dyspnea
cough      |F|sympt             |Cough; Coughing
fever      |F|sign              |Fever; Pyrexia; High temperature; Febrile
headache   |F|sympt             |Headache; Cephalgia; Head pain; Cephalalgia
abdopain   |F|sympt             |Abdominal pain; Stomach ache; Tummy pain; Belly pain
nausea     |F|sympt             |Nausea; Feeling sick; Queasiness
vomit      |F|sympt             |Vomiting; Emesis; Being sick
diarr      |F|sympt             |Diarrhoea; Diarrhea; Loose stools
dyspep     |F|sympt             |Dyspepsia; Indigestion; Upset stomach; Heartburn
fatigue    |F|sympt             |Fatigue; Tiredness; Lethargy; Exhaustion
syncope    |F|sign              |Syncope; Fainting; Faint; Blackout
oedema     |F|sign              |Peripheral oedema; Swollen ankles; Ankle swelling; Pedal oedema; Peripheral edema
rash       |F|sign              |Rash; Skin eruption; Exanthem
jaund      |F|sign              |Jaundice; Icterus; Yellowing of skin
lbp        |F|sympt             |Low back pain; Lumbago; Lower back pain; LBP
confus     |F|sign              |Confusion; Confused; Disorientation
haematuria |F|sign              |Haematuria; Blood in urine; Hematuria
epistaxis  |F|sign              |Epistaxis; Nosebleed; Nose bleed
bleednose  |F|sign              |Bleeding from nose; Nasal haemorrhage
smoker     |F|fnd               |Current smoker; Smoker; Smokes tobacco; Tobacco user
biliarypain|F|sympt             |Biliary pain; Gallbladder pain

proc       |P|-                 |Procedure; Clinical procedure; Intervention
surg       |P|proc              |Surgical procedure; Operation; Surgery
imaging    |P|proc              |Diagnostic imaging; Imaging procedure; Radiological investigation
endosc     |P|proc              |Endoscopic procedure; Endoscopy
therap     |P|proc              |Therapeutic procedure; Treatment procedure
cardproc   |P|proc              |Cardiac procedure; Cardiovascular procedure; Heart procedure
xray       |P|imaging           |Plain radiography; X-ray; Plain film; Radiograph
cxr        |P|xray              |Chest X-ray; CXR; Plain chest radiograph; Chest radiograph; Chest film
ct         |P|imaging           |Computed tomography; CT scan; CAT scan; CT
ctbrain    |P|ct                |CT of head; CT head; Computed tomography of brain; CT brain; Head CT
ctpa       |P|ct                |CT pulmonary angiogram; CTPA; CT pulmonary angiography
mri        |P|imaging           |Magnetic resonance imaging; MRI; MRI scan; MR imaging
mribrain   |P|mri               |MRI of brain; MRI head; MR brain; Magnetic resonance imaging of brain
us         |P|imaging           |Ultrasonography; Ultrasound scan; USS; Sonography
echo       |P|us,cardproc       |Echocardiography; Echocardiogram; Echo; Transthoracic echocardiogram; TTE
dopplerleg |P|us                |Doppler ultrasound of leg veins; Lower limb venous Doppler; Venous duplex scan of leg; DVT scan
ecg        |P|cardproc          |Electrocardiogram; ECG; EKG; 12-lead ECG; Electrocardiography
angio      |P|cardproc          |Coronary angiography; Coronary angiogram; Cardiac catheterisation; Cardiac cath
pci        |P|cardproc,surg     |Percutaneous coronary intervention; PCI; Coronary angioplasty; Coronary stent insertion
ogd        |P|endosc            |Oesophagogastroduodenoscopy; OGD; Upper GI endoscopy; Gastroscopy; EGD
colon      |P|endosc            |Colonoscopy; Lower GI endoscopy; Colonoscopic examination
appendx    |P|surg              |Appendicectomy; Appendectomy; Removal of appendix; Excision of appendix
lapchole   |P|surg              |Laparoscopic cholecystectomy; Lap chole; Keyhole gallbladder removal; Laparoscopic removal of gallbladder
thr        |P|surg              |Total hip replacement; THR; Total hip arthroplasty; Hip replacement
csec       |P|surg              |Caesarean section; C-section; Caesarean delivery; LSCS; Cesarean section
ivcann     |P|therap            |Insertion of peripheral intravenous cannula; IV cannulation; Venous cannulation; Peripheral cannula insertion; Cannulation
catheter   |P|therap            |Urinary catheterisation; Insertion of urinary catheter; Bladder catheterisation; Urethral catheter insertion
transf     |P|therap            |Blood transfusion; Transfusion of red cells; Red cell transfusion
lp         |P|therap            |Lumbar puncture; LP; Spinal tap
spirom     |P|proc              |Spirometry; Spirometric test; Lung function test

sub        |S|-                 |Substance; Material
drug       |S|sub               |Drug substance; Medicinal substance; Drug
biosub     |S|sub               |Body substance; Biological substance
allergen   |S|sub               |Allergen; Allergenic substance
paracsub   |S|drug              |Paracetamol; Acetaminophen
amox       |S|drug              |Amoxicillin; Amoxycillin
penicillin |S|drug,allergen     |Penicillin; Penicillins
warfarin   |S|drug              |Warfarin; Warfarin sodium
insulin    |S|drug              |Insulin; Human insulin
peanut     |S|allergen          |Peanut; Groundnut; Arachis
latex      |S|allergen          |Latex; Natural rubber latex
glucose    |S|biosub            |Glucose; D-glucose

body       |B|-                 |Body structure; Anatomical structure
organ      |B|body              |Organ; Body organ
region     |B|body              |Body region; Anatomical region
heart      |B|organ             |Heart; Heart structure
lung       |B|organ             |Lung; Lung structure; Pulmonary structure
liver      |B|organ             |Liver; Hepatic structure
kidney     |B|organ             |Kidney; Renal structure
wrist      |B|region            |Wrist; Wrist region; Carpal region
chest      |B|region            |Chest; Thorax; Thoracic region
leg        |B|region            |Lower limb; Leg; Lower extremity

org        |O|-                 |Organism; Living organism
bact       |O|org               |Bacterium; Bacteria; Bacterial organism
virus      |O|org               |Virus; Viral organism
fungus     |O|org               |Fungus; Fungal organism
saur       |O|bact              |Staphylococcus aureus; S. aureus; Staph aureus
mrsao      |O|saur              |Methicillin-resistant Staphylococcus aureus; MRSA
ecoli      |O|bact              |Escherichia coli; E. coli
strpn      |O|bact              |Streptococcus pneumoniae; Pneumococcus; Strep pneumoniae
mtb        |O|bact              |Mycobacterium tuberculosis; Tubercle bacillus; M. tuberculosis
sarscov2   |O|virus             |Severe acute respiratory syndrome coronavirus 2; SARS-CoV-2; Novel coronavirus 2019
influenzao |O|virus             |Influenza virus; Flu virus
candida    |O|fungus            |Candida albicans; C. albicans
`;

/** A handful of concepts also carry French terms (preferred first). */
const FRENCH = {
  plt: ['Numération plaquettaire', 'Numération des plaquettes'],
  asthma: ['Asthme', 'Asthme bronchique'],
  dm: ['Diabète sucré'],
  cxr: ['Radiographie thoracique', 'Radiographie du thorax'],
};

// ---------------------------------------------------------------------------------------------
// Release model and editing primitives
// ---------------------------------------------------------------------------------------------

/** key → concept id, shared by all releases (a key names one identifier for ever). */
const KEYS = new Map();
const cid = (key) => {
  const id = KEYS.get(key);
  if (!id) throw new Error(`unknown concept key ${key}`);
  return id;
};

function cloneRelease(rel) {
  const out = { name: '', concepts: new Map(), newConceptNumber: null, newTermNumber: null };
  for (const [id, c] of rel.concepts) {
    out.concepts.set(id, { ...c, parents: [...c.parents], terms: c.terms.map((t) => ({ ...t })) });
  }
  return out;
}

function buildR1() {
  const rel = { name: 'r1', concepts: new Map() };
  const nextConcept = allocator(10040, 101, 23);
  const nextTerm = allocator(100100, 202, 7);
  const pending = [];
  for (const raw of CONCEPTS.split('\n')) {
    const line = raw.trim();
    if (!line) continue;
    const [key, cat, parents, terms] = line.split('|').map((s) => s.trim());
    if (KEYS.has(key)) throw new Error(`duplicate key ${key}`);
    const id = conceptIdOf(nextConcept());
    KEYS.set(key, id);
    const texts = terms.split(';').map((s) => s.trim()).filter(Boolean);
    const c = {
      id, key, category: CATEGORY[cat], status: 'active', parents: [],
      terms: texts.map((text, i) => ({ termId: termIdOf(nextTerm()), text, type: i === 0 ? 'preferred' : 'synonym', lang: 'en' })),
    };
    if (FRENCH[key]) {
      FRENCH[key].forEach((text, i) => c.terms.push({ termId: termIdOf(nextTerm()), text, type: i === 0 ? 'preferred' : 'synonym', lang: 'fr' }));
    }
    rel.concepts.set(id, c);
    pending.push([c, parents === '-' ? [] : parents.split(',').map((s) => s.trim())]);
  }
  for (const [c, parents] of pending) c.parents = parents.map(cid);
  return rel;
}

/**
 * An editing session turns the previous release into the next one and records expected
 * changes and history rows as it goes.
 */
function session(prev, name, conceptStart, termStart, seed) {
  const rel = cloneRelease(prev);
  rel.name = name;
  const nextConcept = allocator(conceptStart, seed, 17);
  const nextTerm = allocator(termStart, seed + 1, 5);
  const changes = [];
  const history = [];

  const get = (key) => {
    const c = rel.concepts.get(cid(key));
    if (!c) throw new Error(`${name}: concept ${key} is not in the release`);
    return c;
  };
  const before = (key) => {
    const c = prev.concepts.get(cid(key));
    if (!c) throw new Error(`${name}: concept ${key} is not in the previous release`);
    return c;
  };
  const findTerm = (c, text) => {
    const t = c.terms.find((x) => x.text === text);
    if (!t) throw new Error(`${name}: ${c.key} has no term "${text}"`);
    return t;
  };

  const api = {
    rel, changes, history, get,
    /** Create a concept with a fresh identifier. */
    create(key, category, parentKeys) {
      if (KEYS.has(key)) throw new Error(`duplicate key ${key}`);
      const id = conceptIdOf(nextConcept());
      KEYS.set(key, id);
      const c = { id, key, category, status: 'active', parents: parentKeys.map(cid), terms: [] };
      rel.concepts.set(id, c);
      return c;
    },
    /** Add a brand-new term (new text, new term_id). */
    addTerm(key, text, type = 'synonym', lang = 'en') {
      const c = get(key);
      c.terms.push({ termId: termIdOf(nextTerm()), text, type, lang });
    },
    /** Remove a term from a concept that stays. */
    removeTerm(key, text) {
      const c = get(key);
      findTerm(c, text);
      c.terms = c.terms.filter((t) => t.text !== text);
    },
    /**
     * Carry a term of `fromKey` (as it was in the previous release) to `toKey`. keepId keeps its
     * term_id; that is only possible when the source does not stay in the file with the same
     * row, which `retire(..., 'inactive')` and the term-id uniqueness check both guard.
     */
    carry(fromKey, toKey, text, keepId, type = 'synonym') {
      const src = findTerm(before(fromKey), text);
      const dst = get(toKey);
      dst.terms.push({ termId: keepId ? src.termId : termIdOf(nextTerm()), text, type, lang: src.lang });
      const live = rel.concepts.get(cid(fromKey));
      if (live && live.status === 'active' && live !== dst) live.terms = live.terms.filter((t) => t.text !== text || t.lang !== src.lang);
    },
    /** Retire: 'inactive' keeps the concept's previous rows with status inactive; 'drop' removes it. */
    retire(key, style) {
      const id = cid(key);
      if (style === 'drop') { rel.concepts.delete(id); return; }
      const old = before(key);
      rel.concepts.set(id, { ...old, status: 'inactive', parents: [], terms: old.terms.map((t) => ({ ...t })) });
    },
    setPreferred(key, text) {
      const c = get(key);
      const lang = findTerm(c, text).lang;
      for (const t of c.terms) if (t.lang === lang) t.type = t.text === text ? 'preferred' : 'synonym';
    },
    /** Change a term's text in place (same term_id): used for case and punctuation edits. */
    retext(key, from, to) { findTerm(get(key), from).text = to; },
    setTerms(key, texts) {
      const c = get(key);
      c.terms = texts.map((text, i) => ({ termId: termIdOf(nextTerm()), text, type: i === 0 ? 'preferred' : 'synonym', lang: 'en' }));
    },
    setParents(key, parentKeys) { get(key).parents = parentKeys.map(cid); },
    setCategory(key, category) { get(key).category = category; },
    change(kind, fromKeys, toKeys, note) { changes.push({ kind, from: fromKeys.map(cid), to: toKeys.map(cid), note }); },
    hist(oldKey, newKey, relation) { history.push({ old: cid(oldKey), new: cid(newKey), relation }); },
    /** Terms of a concept in the previous release, preferred first, one language. */
    termsBefore(key, lang = 'en') { return before(key).terms.filter((t) => t.lang === lang).map((t) => t.text); },
  };
  return api;
}

// ---------------------------------------------------------------------------------------------
// r1 → r2
// ---------------------------------------------------------------------------------------------

function buildR2(r1) {
  const s = session(r1, 'r2', 21050, 300100, 303);

  // addition ×3
  s.create('calpro', 'lab test', ['chemtest']);
  ['Faecal calprotectin', 'Calprotectin, faecal', 'Stool calprotectin', 'FCP'].forEach((t, i) => s.addTerm('calpro', t, i ? 'synonym' : 'preferred'));
  s.change('addition', [], ['calpro'], 'new stool test; one hospital code already points at this id (mapped ahead of release)');
  s.create('longcovid', 'disorder', ['infd']);
  ['Post-COVID-19 condition', 'Long COVID', 'Post-acute sequelae of COVID-19', 'Post COVID syndrome'].forEach((t, i) => s.addTerm('longcovid', t, i ? 'synonym' : 'preferred'));
  s.change('addition', [], ['longcovid'], 'new disorder; closer target for the hospital code mapped related to COVID-19');
  s.create('tavi', 'procedure', ['cardproc', 'surg']);
  ['Transcatheter aortic valve implantation', 'TAVI', 'Transcatheter aortic valve replacement', 'TAVR'].forEach((t, i) => s.addTerm('tavi', t, i ? 'synonym' : 'preferred'));
  s.change('addition', [], ['tavi'], 'new procedure');

  // retirement ×5 (both styles)
  s.retire('bleedtime', 'inactive');
  s.change('retirement', ['bleedtime'], [], 'obsolete test; stays in the file as inactive; no history row, no successor');
  s.retire('thymol', 'drop');
  s.change('retirement', ['thymol'], [], 'obsolete test; removed from the file; no history row, no successor');
  s.retire('cnsld', 'drop');
  s.hist('cnsld', 'copd', 'consider');
  s.change('retirement', ['cnsld'], [], `terms gone from the file; history says consider ${cid('copd')} (Chronic obstructive pulmonary disease)`);
  s.retire('sputr', 'inactive');
  s.change('retirement', ['sputr'], [], `duplicate clean-up without history; lexically very similar concept ${cid('sput')} (Sputum culture) remains`);

  // moved_synonym ×3, the last with the source retired in the same release
  s.carry('chestpain', 'angina', 'Angina', true);
  s.change('moved_synonym', ['chestpain'], ['angina'], "term 'Angina' moved from Chest pain to Angina pectoris (term_id kept)");
  s.carry('gallst', 'biliarypain', 'Biliary colic', false);
  s.change('moved_synonym', ['gallst'], ['biliarypain'], "term 'Biliary colic' moved from Cholelithiasis to Biliary pain (new term_id)");
  s.carry('spcolon', 'ibs', 'Irritable colon', true);
  s.retire('spcolon', 'drop');
  s.change('moved_synonym', ['spcolon'], ['ibs'], "term 'Irritable colon' moved to Irritable bowel syndrome; the source is then retired (see retirement row)");
  s.change('retirement', ['spcolon'], [], `retired and removed in the same release after its synonym 'Irritable colon' moved to ${cid('ibs')}; the other terms are gone`);

  // replacement ×3
  s.create('n_hba1c', 'lab test', ['chemtest', 'endotest']);
  s.termsBefore('hba1c').forEach((t, i) => s.carry('hba1c', 'n_hba1c', t, false, i ? 'synonym' : 'preferred'));
  s.retire('hba1c', 'inactive');
  s.hist('hba1c', 'fruct', 'replaced_by'); // deliberately wrong: the terms went to n_hba1c
  s.change('replacement', ['hba1c'], ['n_hba1c'], `old concept stays inactive; HISTORY DISAGREES: history says replaced_by ${cid('fruct')} (Fructosamine) but the terms went to ${cid('n_hba1c')}`);
  s.create('n_ttg', 'lab test', ['immtest']);
  s.termsBefore('ttg').forEach((t, i) => s.carry('ttg', 'n_ttg', t, true, i ? 'synonym' : 'preferred'));
  s.retire('ttg', 'drop');
  s.change('replacement', ['ttg'], ['n_ttg'], 'old concept removed; term_ids kept; no history row');
  s.create('n_hepc', 'disorder', ['viralhep']);
  s.termsBefore('hepc').forEach((t, i) => s.carry('hepc', 'n_hepc', t, false, i ? 'synonym' : 'preferred'));
  s.retire('hepc', 'inactive');
  s.hist('hepc', 'n_hepc', 'replaced_by');
  s.change('replacement', ['hepc'], ['n_hepc'], 'old concept stays inactive; history replaced_by agrees');

  // merge ×3: survivor keeps its id; into a new concept (history for one of the two); into a
  // new concept with no history at all (two retirements whose terms land in one new concept)
  s.termsBefore('htn2').forEach((t) => s.carry('htn2', 'htn', t, true));
  s.retire('htn2', 'drop');
  s.hist('htn2', 'htn', 'same_as');
  s.change('merge', ['htn', 'htn2'], ['htn'], 'duplicate merged; survivor keeps its id; history same_as');
  s.create('n_b12', 'lab test', ['haemtest', 'chemtest']);
  s.termsBefore('b12').forEach((t, i) => s.carry('b12', 'n_b12', t, false, i ? 'synonym' : 'preferred'));
  s.termsBefore('cobal').forEach((t) => s.carry('cobal', 'n_b12', t, true));
  s.retire('b12', 'inactive');
  s.retire('cobal', 'drop');
  s.hist('b12', 'n_b12', 'replaced_by');
  s.change('merge', ['b12', 'cobal'], ['n_b12'], 'two concepts merged into a new one; one stays inactive, one removed; history only for the first');
  s.create('n_hap', 'disorder', ['pneum']);
  s.termsBefore('hap').forEach((t, i) => s.carry('hap', 'n_hap', t, false, i ? 'synonym' : 'preferred'));
  s.termsBefore('nosoc').forEach((t) => s.carry('nosoc', 'n_hap', t, true));
  s.retire('hap', 'inactive');
  s.retire('nosoc', 'drop');
  s.change('merge', ['hap', 'nosoc'], ['n_hap'], 'two retirements in different branches whose terms land in the same new concept; no history');

  // split ×2: one part keeps the old id; the old concept retired and its terms divided
  s.create('n_scaph', 'disorder', ['fracture']);
  s.carry('fxwrist', 'n_scaph', 'Fracture of scaphoid bone', false, 'preferred');
  s.carry('fxwrist', 'n_scaph', 'Scaphoid fracture', true);
  s.change('split', ['fxwrist'], ['fxwrist', 'n_scaph'], 'scaphoid terms (2 of 6) move to a new concept; Fracture of wrist keeps its id and 4 terms');
  s.create('n_cellleg', 'disorder', ['cell']);
  s.addTerm('n_cellleg', 'Cellulitis of lower limb', 'preferred');
  s.carry('cellleg', 'n_cellleg', 'Cellulitis of leg', false);
  s.carry('cellleg', 'n_cellleg', 'Leg cellulitis', false);
  s.create('n_absleg', 'disorder', ['skind', 'infd']);
  s.addTerm('n_absleg', 'Abscess of lower limb', 'preferred');
  s.carry('cellleg', 'n_absleg', 'Abscess of leg', false);
  s.carry('cellleg', 'n_absleg', 'Lower limb abscess', false);
  s.retire('cellleg', 'inactive');
  s.hist('cellleg', 'n_cellleg', 'consider');
  s.hist('cellleg', 'n_absleg', 'consider');
  s.change('split', ['cellleg'], ['n_cellleg', 'n_absleg'], 'lumped concept retired (inactive); 2+2 synonyms to two new concepts; old preferred term dropped');

  // preferred_term_change ×2
  s.addTerm('ckd', 'Chronic kidney disease', 'synonym');
  s.setPreferred('ckd', 'Chronic kidney disease');
  s.change('preferred_term_change', ['ckd'], ['ckd'], "preferred 'Chronic renal failure' -> 'Chronic kidney disease'; the old preferred stays as a synonym");
  s.setPreferred('bipol', 'Bipolar affective disorder');
  s.removeTerm('bipol', 'Manic depression');
  s.change('preferred_term_change', ['bipol'], ['bipol'], "preferred 'Manic depression' -> 'Bipolar affective disorder' (promoted synonym); the old preferred is dropped");

  // synonym_added ×2, synonym_removed ×2
  s.addTerm('hb', 'Hgb');
  s.change('synonym_added', ['hb'], ['hb'], "term 'Hgb' added");
  s.addTerm('vitd', 'Serum 25-hydroxyvitamin D');
  s.change('synonym_added', ['vitd'], ['vitd'], "term 'Serum 25-hydroxyvitamin D' added");
  s.removeTerm('dyspep', 'Heartburn');
  s.change('synonym_removed', ['dyspep'], ['dyspep'], "term 'Heartburn' removed");
  s.removeTerm('fbc', 'Blood count');
  s.change('synonym_removed', ['fbc'], ['fbc'], "term 'Blood count' removed");

  // Not changes (must not be reported): case-only and punctuation-only edits, same term_id.
  s.retext('crp', 'CRP Level', 'CRP level');
  s.retext('ck', 'Creatine kinase, serum', 'Creatine kinase serum');

  // id_reuse ×2: one pure, one where the old meaning moves to a new identifier
  s.setTerms('acp', ['Plasma ammonia measurement', 'Ammonia level', 'Blood ammonia', 'Plasma ammonia']);
  s.change('id_reuse', ['acp'], ['acp'], 'identifier reused for Plasma ammonia measurement; the acid phosphatase terms are gone');
  s.create('n_osteomal', 'disorder', ['mskd']);
  s.termsBefore('osteomal').forEach((t, i) => s.carry('osteomal', 'n_osteomal', t, true, i ? 'synonym' : 'preferred'));
  s.setTerms('osteomal', ['Adhesive capsulitis of shoulder', 'Frozen shoulder', 'Adhesive capsulitis']);
  s.change('id_reuse', ['osteomal'], ['osteomal', 'n_osteomal'], `identifier reused for Adhesive capsulitis of shoulder; the osteomalacia terms moved to new ${cid('n_osteomal')} (term_ids kept)`);

  // category_change ×2 (terms and parents unchanged)
  s.setCategory('obes', 'finding');
  s.change('category_change', ['obes'], ['obes'], 'disorder -> finding');
  s.setCategory('penall', 'finding');
  s.change('category_change', ['penall'], ['penall'], 'disorder -> finding');

  // hierarchy_change ×2
  s.setParents('gastroent', ['giinf']);
  s.change('hierarchy_change', ['gastroent'], ['gastroent'], `parent ${cid('gid')} -> ${cid('giinf')}`);
  s.setParents('pneum', ['respinf', 'lrti']);
  s.change('hierarchy_change', ['pneum'], ['pneum'], `parent ${cid('lrti')} added`);

  // reorganization ×2: 2 old concepts -> 3 concepts with terms crossing
  s.create('n_urti', 'disorder', ['respinf']);
  s.create('n_cold', 'disorder', ['respinf']);
  s.create('n_rhinosin', 'disorder', ['respinf']);
  s.carry('urti', 'n_urti', 'Upper respiratory tract infection', true, 'preferred');
  s.carry('urti', 'n_urti', 'URTI', true);
  s.carry('urti', 'n_urti', 'Upper respiratory infection', true);
  s.carry('urti', 'n_urti', 'Acute coryza', true);
  s.carry('urti', 'n_cold', 'Common cold', true, 'preferred');
  s.carry('urti', 'n_cold', 'Head cold', true);
  s.carry('acsin', 'n_cold', 'Acute rhinitis', false);
  s.carry('acsin', 'n_cold', 'Nasal catarrh', true);
  s.carry('acsin', 'n_rhinosin', 'Acute rhinosinusitis', true, 'preferred');
  s.carry('acsin', 'n_rhinosin', 'Acute sinusitis', true);
  s.carry('acsin', 'n_rhinosin', 'Sinus infection', false);
  s.retire('urti', 'drop');
  s.retire('acsin', 'drop');
  s.hist('acsin', 'n_rhinosin', 'consider');
  s.change('reorganization', ['urti', 'acsin'], ['n_urti', 'n_cold', 'n_rhinosin'], 'both old concepts removed; Common cold gathers two terms from each');
  s.create('n_ue', 'lab test', ['chemtest']);
  s.create('n_renal', 'lab test', ['chemtest']);
  s.carry('ue', 'n_ue', 'Urea and electrolytes', false, 'preferred');
  s.carry('ue', 'n_ue', 'U&E', false);
  s.carry('ue', 'n_ue', 'U and E', false);
  s.carry('ue', 'n_renal', 'Renal profile', false, 'preferred');
  s.carry('ue', 'n_renal', 'Kidney function tests', false);
  s.carry('creat', 'n_renal', 'eGFR', true);
  s.carry('creat', 'n_renal', 'Estimated glomerular filtration rate', true);
  s.retire('ue', 'inactive');
  s.change('reorganization', ['ue', 'creat'], ['n_ue', 'n_renal', 'creat'], 'U&E retired (inactive) into two new panels; Serum creatinine keeps its id but gives its two eGFR terms to the new Renal profile');

  return s;
}

// ---------------------------------------------------------------------------------------------
// r2 → r3
// ---------------------------------------------------------------------------------------------

function buildR3(r2) {
  const s = session(r2, 'r3', 24030, 400100, 404);

  s.create('sflc', 'lab test', ['immtest']);
  ['Serum free light chains', 'Free light chain assay', 'sFLC', 'Kappa and lambda free light chains'].forEach((t, i) => s.addTerm('sflc', t, i ? 'synonym' : 'preferred'));
  s.change('addition', [], ['sflc'], 'new test');
  s.create('autourine', 'lab test', ['urinetest']);
  ['Automated urine microscopy', 'Urine sediment analysis, automated', 'Automated urine sediment examination'].forEach((t, i) => s.addTerm('autourine', t, i ? 'synonym' : 'preferred'));
  s.change('addition', [], ['autourine'], `new test; lexically close to retired ${cid('umicro')} (Urine microscopy)`);

  s.retire('sickle', 'inactive');
  s.hist('sickle', 'hbelec', 'consider');
  s.change('retirement', ['sickle'], [], `stays inactive; history says consider ${cid('hbelec')} (Haemoglobin electrophoresis)`);
  s.retire('umicro', 'drop');
  s.change('retirement', ['umicro'], [], `removed; no history row; lexically similar new concept ${cid('autourine')} (Automated urine microscopy)`);

  s.create('n_udrug', 'lab test', ['urinetest']);
  s.termsBefore('udrug').forEach((t, i) => s.carry('udrug', 'n_udrug', t, i % 2 === 0, i ? 'synonym' : 'preferred'));
  s.retire('udrug', 'drop');
  s.hist('udrug', 'etoh', 'replaced_by'); // deliberately wrong: the terms went to n_udrug
  s.change('replacement', ['udrug'], ['n_udrug'], `old concept removed; HISTORY DISAGREES: history says replaced_by ${cid('etoh')} (Blood alcohol) but the terms went to ${cid('n_udrug')}`);

  s.termsBefore('bleednose').forEach((t) => s.carry('bleednose', 'epistaxis', t, false));
  s.retire('bleednose', 'drop');
  s.change('merge', ['epistaxis', 'bleednose'], ['epistaxis'], 'duplicate merged; survivor keeps its id; no history');

  s.create('n_divitis', 'disorder', ['gid']);
  s.carry('divert', 'n_divitis', 'Diverticulitis of colon', true, 'preferred');
  s.carry('divert', 'n_divitis', 'Acute diverticulitis', false);
  s.change('split', ['divert'], ['divert', 'n_divitis'], 'diverticulitis terms (2 of 6) to a new concept; the old id keeps the diverticulosis terms');

  s.carry('delir', 'confus', 'Acute confusion', true);
  s.change('moved_synonym', ['delir'], ['confus'], "term 'Acute confusion' moved from Delirium to Confusion (term_id kept)");

  s.addTerm('nafld', 'Metabolic dysfunction-associated steatotic liver disease');
  s.setPreferred('nafld', 'Metabolic dysfunction-associated steatotic liver disease');
  s.change('preferred_term_change', ['nafld'], ['nafld'], "preferred 'Non-alcoholic fatty liver disease' -> 'Metabolic dysfunction-associated steatotic liver disease'; the old preferred stays as a synonym");

  s.addTerm('ecg', 'Resting 12-lead electrocardiogram');
  s.change('synonym_added', ['ecg'], ['ecg'], "term 'Resting 12-lead electrocardiogram' added");
  s.removeTerm('glandfev', 'Kissing disease');
  s.change('synonym_removed', ['glandfev'], ['glandfev'], "term 'Kissing disease' removed");

  s.setParents('sciat', ['neurod']);
  s.change('hierarchy_change', ['sciat'], ['sciat'], `parent ${cid('mskd')} removed`);

  return s;
}

// ---------------------------------------------------------------------------------------------
// The hospital's mapping set (to r1) and the reviewer's verdicts for r1 → r2.
//   code | local label | target key (or !unknown) | relation | owner | verdict | successor key | lex | note
// successor: '=' means the target itself. lex: 'L' when the mapping came from lexical matching.
// ---------------------------------------------------------------------------------------------

const MAPPINGS = String.raw`
LAB-0401|FBC|fbc|exact|Haematology|ok|||synonym 'Blood count' removed; meaning unchanged
LAB-0412|Hb|hb|exact|Haematology|ok|||synonym 'Hgb' added; meaning unchanged
LAB-0417|PLATELETS|plt|exact|Haematology|ok|||
LAB-0433|Blood film - haem review|film|exact|Haematology|ok|||
LAB-0440|Ferritin serum|ferritin|exact|Haematology|ok|||
LAB-0441|B12|b12|exact|Haematology|redirect|n_b12||merged with Cobalamin measurement into a new concept; history replaced_by agrees
LAB-0442|Cobalamin (send away)|cobal|exact|Clinical Biochemistry|redirect|n_b12||merged into the new Vitamin B12 concept; no history row, the terms show it
LAB-0444|VIT B12 - PAEDS|b12|exact|Paediatrics|redirect|n_b12||merged into a new concept
LAB-0443|FOLATE SERUM|folate|exact|Haematology|ok|||
LAB-0450|Bleeding time (Ivy)|bleedtime|exact|Haematology|broken|||retired, no successor
LAB-0451|BLEEDING TIME - PRE-OP|bleedtime|exact|General Surgery|broken|||retired, no successor
LAB-0460|PT/INR|inr|narrow|Haematology|ok|||
LAB-0463|D-DIMER (ED)|ddimer|exact|Emergency Department|ok|||
LAB-0470|G&S|gandsave|exact|Haematology|ok|||
LAB-0471|XMATCH 2 UNITS|xmatch|broad|Haematology|ok|||
LAB-0480|DCT|dat|exact|Haematology|ok|||
LAB-0102|U&E|ue|exact|Clinical Biochemistry|ambiguous|n_ue||U&E reorganised into Urea and electrolytes and Renal profile
LAB-0103|U+E (ED)|ue|exact|Emergency Department|ambiguous|n_ue||U&E reorganised into two panels
LAB-0105|CREAT|creat|exact|Clinical Biochemistry|ambiguous|=||Serum creatinine keeps its id but gave eGFR to the new Renal profile
LAB-0106|eGFR|creat|exact|Renal Unit|ambiguous|n_renal|L|mapped through the synonym eGFR, which moved to the new Renal profile
LAB-0110|SODIUM|na|exact|Clinical Biochemistry|ok|||
LAB-0111|POTASSIUM|k|exact|Clinical Biochemistry|ok|||
LAB-0112|Bone profile - Ca|ca|narrow|Clinical Biochemistry|ok|||
LAB-0120|LFT|lft|exact|Clinical Biochemistry|ok|||
LAB-0121|ALT|alt|exact|Clinical Biochemistry|ok|||
LAB-0125|Bilirubin total|bili|exact|Clinical Biochemistry|ok|||
LAB-0130|CRP|crp|exact|Clinical Biochemistry|ok|||only the case of synonym 'CRP Level' changed
LAB-0131|Procalcitonin (ICU)|pct|exact|Clinical Biochemistry|ok|||
LAB-0133|AMYLASE|amyl|exact|Clinical Biochemistry|ok|||
LAB-0134|ACID PHOS|acp|exact|Clinical Biochemistry|drifted|||identifier reused for Plasma ammonia measurement; acid phosphatase has no concept in r2
LAB-0135|CK|ck|exact|Clinical Biochemistry|ok|||only punctuation of synonym 'Creatine kinase, serum' changed
LAB-0140|TROP T|trop|exact|Clinical Biochemistry|ok|||
LAB-0141|hs Trop I - ED|hstrop|exact|Emergency Department|ok|||
LAB-0142|NT-proBNP|bnp|exact|Cardiology|ok|||
LAB-0145|LIPIDS FASTING|lipid|exact|Clinical Biochemistry|ok|||
LAB-0146|Cholesterol - fastng|chol|exact|Clinical Biochemistry|ok|||
LAB-0150|GLUCOSE RANDOM|glu|exact|Clinical Biochemistry|ok|||
LAB-0152|GTT 75g|ogtt|exact|Obstetrics & Gynaecology|ok|||
LAB-0155|HbA1c|hba1c|exact|Clinical Biochemistry|redirect|n_hba1c||replaced by a new id; the history row (replaced_by Fructosamine) disagrees with the terms
LAB-0156|HBA1C POCT - diabetic clinic|hba1c|exact|Diabetes & Endocrinology|redirect|n_hba1c||replaced by a new id; follow the terms, not the history row
LAB-0158|Lactate (VBG)|lact|exact|Emergency Department|ok|||
LAB-0162|IRON STUDIES|iron|narrow|Haematology|ok|||
LAB-0165|Vit D|vitd|exact|Clinical Biochemistry|ok|||synonym added; meaning unchanged
LAB-0170|PARACETAMOL LEVL|paracet|exact|Emergency Department|ok|||
LAB-0178|Thymol turbidity|thymol|exact|Clinical Biochemistry|broken|||retired and removed, no successor
LAB-0180|PSA|psa|exact|Clinical Biochemistry|ok|||
LAB-0190|TFT|tft|exact|Clinical Biochemistry|ok|||
LAB-0191|TSH|tsh|exact|Clinical Biochemistry|ok|||
LAB-0198|Beta HCG quant|hcg|exact|Obstetrics & Gynaecology|ok|||
LAB-0210|ABG|abg|exact|Respiratory Medicine|ok|||
LAB-0220|URINE DIP|udip|exact|Emergency Department|ok|||
LAB-0222|Urine ACR|uacr|exact|Renal Unit|ok|||
LAB-0225|Preg test urine|upreg|exact|Emergency Department|ok|||
LAB-0227|UDS - tox screen|udrug|exact|Emergency Department|ok|||
LAB-0230|Calprotectin faecal|!r2only|exact|Gastroenterology|unknown_target|||target id is not in r1 (it first appears in r2)
LAB-0235|TTG IgA / coeliac screen|ttg|exact|Immunology|redirect|n_ttg||replaced by a new id; no history row
LAB-0236|COELIAC SCREEN|ttg|exact|Gastroenterology|redirect|n_ttg||replaced by a new id
LAB-0238|ANA|ana|exact|Immunology|ok|||
LAB-0239|RHEUMATOID FACTOR|rf|exact|Immunology|ok|||
LAB-0199|Anti-Mullerian hormone|!absent|exact|Obstetrics & Gynaecology|unknown_target|||well-formed id that exists in no release
MIC-1001|BLOOD CULTURE|bc|exact|Microbiology|ok|||
MIC-1004|MSU|uc|exact|Microbiology|ok|||
MIC-1006|Sputum C/S routine|sputr|exact|Microbiology|broken|||retired without history; candidate by similarity: Sputum culture
MIC-1007|SPUTUM MC+S|sput|exact|Microbiology|ok|||
MIC-1010|Wound swab|wound|exact|Microbiology|ok|||
MIC-1016|C DIFF TOXIN|cdiff|exact|Microbiology|ok|||
MIC-1022|MRSA SCREEN - ADMISSION|mrsa|exact|Infection Prevention|ok|||
MIC-1030|SARS-CoV-2 PCR|covidpcr|exact|Microbiology|ok|||
MIC-1031|FLU A/B PCR|flupcr|exact|Microbiology|ok|||
MIC-1040|HBsAg|hbsag|exact|Microbiology|ok|||
MIC-1042|HIV Ag/Ab combo|hivag|exact|Microbiology|ok|||
MIC-1045|EBV serology (glandular fever)|ebv|exact|Microbiology|ok|||
MIC-1050|IGRA|igra|exact|Respiratory Medicine|ok|||
DXP-2001|HYPERTENSION|hypert|exact|Clinical Coding|ok|||
DXP-2002|Essential hypertension|htn|exact|Cardiology|ok|||merge survivor; gains the Primary hypertension terms
DXP-2003|Hypertension - primary|htn2|exact|Clinical Coding|redirect|htn||merged into Essential hypertension; history same_as agrees
DXP-2004|PRIMARY HTN - GP LETTER|htn2|exact|Clinical Coding|redirect|htn||merged into Essential hypertension
DXP-2010|MI|mi|exact|Cardiology|ok|||
DXP-2011|STEMI|stemi|exact|Cardiology|ok|||
DXP-2013|ANGINA|chestpain|exact|Clinical Coding|drifted|angina|L|mapped through the synonym Angina, which moved to Angina pectoris
DXP-2014|Chest pain (ED)|chestpain|exact|Emergency Department|ok|||lost the synonym Angina; Chest pain itself unchanged
DXP-2015|Stable angina|angina|broad|Cardiology|ok|||gained the synonym Angina
DXP-2020|AF|af|exact|Cardiology|ok|||
DXP-2022|Heart failure|hf|exact|Cardiology|ok|||
DXP-2025|DVT|dvt|exact|Acute Medicine|ok|||
DXP-2026|PE|pe|exact|Acute Medicine|ok|||
DXP-2028|CVA / stroke|stroke|exact|Neurology|ok|||
DXP-2040|Asthma - adult|asthma|narrow|Respiratory Medicine|ok|||
DXP-2041|COPD|copd|exact|Respiratory Medicine|ok|||
DXP-2042|CNSLD|cnsld|exact|Respiratory Medicine|broken|||retired; history says consider Chronic obstructive pulmonary disease (needs a human)
DXP-2045|PNEUMONIA|pneum|exact|Acute Medicine|context_changed|=||parent Lower respiratory tract infection added; terms unchanged
DXP-2046|CAP|cap|exact|Acute Medicine|ok|||
DXP-2047|HAP|hap|exact|Acute Medicine|redirect|n_hap||merged with Nosocomial pneumonia into a new concept; no history
DXP-2048|Nosocomial pneumonia - ward|nosoc|exact|Infection Prevention|redirect|n_hap||merged into the new Hospital acquired pneumonia concept
DXP-2050|URTI|urti|exact|Acute Medicine|ambiguous|n_urti||reorganised into three concepts
DXP-2051|Common cold|urti|exact|Paediatrics|ambiguous|n_cold|L|mapped through the synonym Common cold, now its own concept
DXP-2052|Sinusitis acute|acsin|exact|Emergency Department|ambiguous|n_rhinosin||reorganised; history consider Acute rhinosinusitis
DXP-2053|SINUS INFECTION|acsin|exact|Emergency Department|ambiguous|n_rhinosin||reorganised
DXP-2054|URTI (paeds)|urti|narrow|Paediatrics|ambiguous|n_urti||reorganised
DXP-2055|Long COVID clinic|covid|related|Respiratory Medicine|ok|||target unchanged; r2 adds the closer Post-COVID-19 condition
DXP-2056|COVID-19|covid|exact|Infection Prevention|ok|||
DXP-2060|GORD|gord|exact|Gastroenterology|ok|||
DXP-2061|Dyspepsia|dyspep|exact|Gastroenterology|ok|||synonym 'Heartburn' removed; meaning unchanged
DXP-2063|Gastro-enteritis|gastroent|exact|Acute Medicine|context_changed|=||moved under Gastrointestinal infection; terms unchanged
DXP-2065|Gallstones|gallst|exact|General Surgery|ok|||lost the synonym Biliary colic; meaning unchanged
DXP-2066|BILIARY COLIC|gallst|exact|General Surgery|drifted|biliarypain|L|mapped through the synonym Biliary colic, which moved to Biliary pain
DXP-2067|Irritable colon|spcolon|exact|Gastroenterology|drifted|ibs|L|the synonym moved to Irritable bowel syndrome and Spastic colon was retired
DXP-2068|IBS|ibs|exact|Gastroenterology|ok|||gained the synonym Irritable colon
DXP-2070|Appendicitis|appx|exact|General Surgery|ok|||
DXP-2072|Crohns disease|crohn|exact|Gastroenterology|ok|||
DXP-2075|Chronic hep C|hepc|exact|Gastroenterology|redirect|n_hepc||replaced by a new id; history replaced_by agrees
DXP-2080|T2DM|t2dm|exact|Diabetes & Endocrinology|ok|||
DXP-2081|Type 1 diabetes|t1dm|exact|Diabetes & Endocrinology|ok|||
DXP-2085|OBESITY|obes|exact|Diabetes & Endocrinology|context_changed|=||category disorder -> finding; terms unchanged
DXP-2087|Obese - BMI>30|obes|broad|Dietetics|context_changed|=||category disorder -> finding
DXP-2090|CRF|ckd|exact|Renal Unit|ok|||preferred term renamed to Chronic kidney disease; meaning unchanged
DXP-2093|CHRONIC RENAL FAILURE|ckd|exact|Clinical Coding|ok|||preferred term renamed; old preferred kept as synonym
DXP-2091|AKI|aki|exact|Renal Unit|ok|||
DXP-2092|UTI|uti|exact|Acute Medicine|ok|||
DXP-2100|Osteomalacia|osteomal|exact|Rheumatology|drifted|n_osteomal||identifier reused for Adhesive capsulitis of shoulder; osteomalacia moved to a new id
DXP-2101|Osteoarthritis knee|oa|broad|Trauma & Orthopaedics|ok|||
DXP-2102|Gout|gout|exact|Rheumatology|ok|||
DXP-2110|#WRIST|fxwrist|exact|Trauma & Orthopaedics|ambiguous|=||split; the wrist part keeps the id
DXP-2111|Scaphoid fracture|fxwrist|exact|Emergency Department|ambiguous|n_scaph|L|split; the scaphoid terms went to a new concept
DXP-2113|Wrist fracture - child|fxwrist|narrow|Paediatrics|ambiguous|=||split; the wrist part keeps the id
DXP-2112|#NOF|fxneckfem|exact|Trauma & Orthopaedics|ok|||
DXP-2115|Cellulitis leg|cellleg|exact|Acute Medicine|ambiguous|n_cellleg||split into cellulitis and abscess of lower limb
DXP-2116|Leg abscess - I&D|cellleg|exact|General Surgery|ambiguous|n_absleg||split into cellulitis and abscess of lower limb
DXP-2120|Manic depression|bipol|exact|Mental Health Liaison|ok|||preferred term renamed; the old wording is dropped but the meaning is unchanged
DXP-2121|Depression|dep|exact|Mental Health Liaison|ok|||
DXP-2122|Anxiety (GAD)|anx|exact|Mental Health Liaison|ok|||
DXP-2125|Dementia|dement|exact|Care of the Elderly|ok|||
DXP-2130|Iron def anaemia|ida|exact|Haematology|ok|||
DXP-2140|Eczema|eczema|exact|Dermatology|ok|||
DXP-2150|Pnemonia aspiration|asppn|exact|Acute Medicine|ok|||
DXP-2155|Migraine|!typo|exact|Neurology|unknown_target|||target id has a transposition typo (check letter fails)
ALG-0010|PENICILLIN ALLERGY|penall|exact|Pharmacy|context_changed|=||category disorder -> finding; terms unchanged
ALG-0011|Peanut allergy|nutall|exact|Pharmacy|ok|||
RAD-3001|CXR|cxr|exact|Radiology|ok|||
RAD-3005|CT HEAD|ctbrain|exact|Radiology|ok|||
RAD-3006|CTPA|ctpa|exact|Radiology|ok|||
RAD-3016|Echo - TTE|echo|exact|Cardiology|ok|||
RAD-3020|Venous doppler leg (DVT)|dopplerleg|exact|Radiology|ok|||
PRC-4001|ECG 12 lead|ecg|exact|Cardiology|ok|||
PRC-4005|OGD|ogd|exact|Gastroenterology|ok|||
PRC-4006|Colonoscopy|colon|exact|Gastroenterology|ok|||
PRC-4010|Lap chole|lapchole|exact|General Surgery|ok|||
PRC-4020|LSCS|csec|exact|Obstetrics & Gynaecology|ok|||
PRC-4025|Cannulation|ivcann|exact|Acute Medicine|ok|||
PRC-4030|Blood transfusion|transf|exact|Haematology|ok|||
`;

/** Usage counts chosen by hand for a few codes; the rest come from a skewed hash-based draw. */
const USAGE = {
  'LAB-0401': 48213, 'LAB-0441': 8420, 'LAB-0440': 7710, 'LAB-0102': 41877, 'LAB-0103': 17402, 'LAB-0130': 30122, 'LAB-0412': 6120,
  'LAB-0155': 15220, 'LAB-0470': 9034, 'LAB-0178': 2, 'DXP-2042': 1, 'LAB-0134': 37,
  'DXP-2100': 212, 'DXP-2003': 3310, 'DXP-2013': 1288, 'LAB-0230': 14, 'DXP-2155': 96,
};
function usageOf(code) {
  if (USAGE[code] !== undefined) return USAGE[code];
  const u = prng(fnv1a(code))();
  return Math.max(1, Math.round(10 ** (4.6 * u ** 1.4)));
}

function buildMappings(r1, r2, r3) {
  const rows = [];
  for (const raw of MAPPINGS.split('\n')) {
    const line = raw.trim();
    if (!line) continue;
    const fields = line.split('|');
    if (fields.length !== 9) throw new Error(`MAPPINGS: ${fields.length} fields, expected 9: ${line}`);
    const [code, label, targetKey, relation, owner, verdict, successorKey, lex, note] = fields;
    if (lex !== '' && lex !== 'L') throw new Error(`MAPPINGS: lex flag must be empty or L: ${line}`);
    let target;
    if (targetKey === '!r2only') target = cid('calpro');
    else if (targetKey === '!absent') target = absentId(r1, r2, r3);
    else if (targetKey === '!typo') target = typoId(cid('migr'));
    else target = cid(targetKey);
    const successor = successorKey === '' ? '' : successorKey === '=' ? target : cid(successorKey);
    rows.push({ code, label, target, relation, owner, usage: usageOf(code), verdict, successor, lex: lex === 'L', note: note ?? '' });
  }
  return rows;
}
/** A well-formed concept id (valid check letter) that is in no release: a gap inside r1's range. */
function absentId(...rels) {
  const used = new Set(rels.flatMap((r) => [...r.concepts.keys()]));
  for (let n = 13337; ; n++) { const id = conceptIdOf(n); if (!used.has(id) && ![...KEYS.values()].includes(id)) return id; }
}
/** Swap two adjacent, different digits of an id and keep its check letter: a typical typing slip. */
function typoId(id) {
  const m = CONCEPT_ID_RE.exec(id);
  const d = m[1].split('');
  for (let i = 1; i < d.length - 1; i++) {
    if (d[i] !== d[i + 1]) { [d[i], d[i + 1]] = [d[i + 1], d[i]]; return `QV${d.join('')}${m[2]}`; }
  }
  throw new Error(`cannot make a typo of ${id}`);
}

// ---------------------------------------------------------------------------------------------
// Writing
// ---------------------------------------------------------------------------------------------

const tsv = (header, rows) => [header, ...rows].map((r) => r.join('\t')).join('\n') + '\n';

function releaseRows(rel) {
  const rows = [];
  const ids = [...rel.concepts.keys()].sort();
  for (const id of ids) {
    const c = rel.concepts.get(id);
    const langs = [...new Set(c.terms.map((t) => t.lang))].sort((a, b) => (a === 'en' ? -1 : b === 'en' ? 1 : a.localeCompare(b)));
    for (const lang of langs) {
      const ts = c.terms.filter((t) => t.lang === lang);
      for (const t of [...ts.filter((x) => x.type === 'preferred'), ...ts.filter((x) => x.type !== 'preferred')]) {
        rows.push([c.id, t.text, t.type, c.status, c.category, t.termId, t.lang]);
      }
    }
  }
  return rows;
}
function hierarchyRows(rel) {
  const rows = [];
  for (const id of [...rel.concepts.keys()].sort()) {
    const c = rel.concepts.get(id);
    if (c.status !== 'active') continue;
    for (const p of [...c.parents].sort()) rows.push([c.id, p]);
  }
  return rows;
}
const KIND_ORDER = ['addition', 'retirement', 'replacement', 'merge', 'split', 'moved_synonym', 'preferred_term_change',
  'synonym_added', 'synonym_removed', 'id_reuse', 'category_change', 'hierarchy_change', 'reorganization'];
function changeRows(changes) {
  return [...changes]
    .sort((a, b) => KIND_ORDER.indexOf(a.kind) - KIND_ORDER.indexOf(b.kind) || a.from.join('|').localeCompare(b.from.join('|')) || a.to.join('|').localeCompare(b.to.join('|')))
    .map((c) => [c.kind, c.from.join('|'), c.to.join('|'), c.note]);
}
function historyRows(history) {
  return [...history].sort((a, b) => a.old.localeCompare(b.old) || a.new.localeCompare(b.new)).map((h) => [h.old, h.new, h.relation]);
}

const PREDICATE = { exact: 'skos:exactMatch', broad: 'skos:broadMatch', narrow: 'skos:narrowMatch', related: 'skos:relatedMatch' };
const CONFIDENCE = { exact: '0.95', broad: '0.8', narrow: '0.8', related: '0.6' };

function sssom(mappings, r1) {
  const meta = [
    'curie_map:',
    '  FHGH: https://example.org/fenwick-hollow/local-code/',
    '  FHGHV: https://example.org/fenwick-hollow/vocab/',
    '  QCV: https://example.org/quillmere/concept/',
    '  QCVREL: https://example.org/quillmere/release/',
    'mapping_set_id: https://example.org/fenwick-hollow/mappings/local-codes-to-qcv-r1',
    'mapping_set_version: fh-2023.11',
    'mapping_set_title: Fenwick Hollow General Hospital local codes to the Quillmere Clinical Vocabulary r1 (invented demo data)',
    'mapping_set_description: Invented demo mapping set for termdrift. The hospital, the vocabulary, the codes and the counts are fictional.',
    'creator_label:',
    '  - Fenwick Hollow General Hospital terminology team (fictional)',
    'license: https://creativecommons.org/publicdomain/zero/1.0/',
    'object_source: QCVREL:r1',
    'object_source_version: r1',
    'mapping_date: 2023-11-20',
    'extension_definitions:',
    '  - slot_name: usage_count',
    '    property: FHGHV:usageCount',
    '    type_hint: xsd:integer',
    '  - slot_name: owner',
    '    property: FHGHV:owningDepartment',
    '    type_hint: xsd:string',
  ].map((l) => `#${l}`);
  const header = ['subject_id', 'subject_label', 'predicate_id', 'object_id', 'object_label', 'mapping_justification', 'confidence', 'usage_count', 'owner'];
  const rows = mappings.map((m) => {
    const target = r1.concepts.get(m.target);
    const label = target ? target.terms.find((t) => t.lang === 'en' && t.type === 'preferred').text : '';
    return [`FHGH:${m.code}`, m.label, PREDICATE[m.relation], `QCV:${m.target}`, label,
      m.lex ? 'semapv:LexicalMatching' : 'semapv:ManualMappingCuration', m.lex ? '0.7' : CONFIDENCE[m.relation], String(m.usage), m.owner];
  });
  return meta.join('\n') + '\n' + tsv(header, rows);
}

function writeAll() {
  const r1 = buildR1();
  const s2 = buildR2(r1);
  const s3 = buildR3(s2.rel);
  const mappings = buildMappings(r1, s2.rel, s3.rel);
  mkdirSync(OUT, { recursive: true });
  const put = (name, text) => writeFileSync(join(OUT, name), text);
  const RH = ['concept_id', 'term', 'term_type', 'status', 'category', 'term_id', 'language'];
  put('release-r1.tsv', tsv(RH, releaseRows(r1)));
  put('release-r2.tsv', tsv(RH, releaseRows(s2.rel)));
  put('release-r3.tsv', tsv(RH, releaseRows(s3.rel)));
  put('hierarchy-r1.tsv', tsv(['concept_id', 'parent_id'], hierarchyRows(r1)));
  put('hierarchy-r2.tsv', tsv(['concept_id', 'parent_id'], hierarchyRows(s2.rel)));
  put('hierarchy-r3.tsv', tsv(['concept_id', 'parent_id'], hierarchyRows(s3.rel)));
  put('history-r2.tsv', tsv(['old_id', 'new_id', 'relation'], historyRows(s2.history)));
  put('history-r3.tsv', tsv(['old_id', 'new_id', 'relation'], historyRows(s3.history)));
  put('expected-changes-r1-r2.tsv', tsv(['kind', 'from', 'to', 'note'], changeRows(s2.changes)));
  put('expected-changes-r2-r3.tsv', tsv(['kind', 'from', 'to', 'note'], changeRows(s3.changes)));
  put('mappings.tsv', tsv(['local_code', 'local_label', 'target_id', 'relation', 'usage', 'owner'],
    mappings.map((m) => [m.code, m.label, m.target, m.relation, String(m.usage), m.owner])));
  put('mappings.sssom.tsv', sssom(mappings, r1));
  put('expected-verdicts-r1-r2.tsv', tsv(['local_code', 'verdict', 'successor', 'note'],
    mappings.map((m) => [m.code, m.verdict, m.successor, m.note])));
}

// ---------------------------------------------------------------------------------------------
// Checking the files on disk
// ---------------------------------------------------------------------------------------------

const problems = [];
const fail = (msg) => problems.push(msg);

function readTsv(name, { comments = false } = {}) {
  const text = readFileSync(join(OUT, name), 'utf8');
  if (text.charCodeAt(0) === 0xfeff) fail(`${name}: starts with a byte order mark`);
  if (text.includes('\r')) fail(`${name}: contains CR characters`);
  if (!text.endsWith('\n')) fail(`${name}: does not end with a newline`);
  let lines = text.split('\n');
  lines.pop();
  const meta = [];
  if (comments) { while (lines.length && lines[0].startsWith('#')) meta.push(lines.shift()); }
  const header = lines[0].split('\t');
  const rows = [];
  const seen = new Set();
  lines.slice(1).forEach((line, i) => {
    const f = line.split('\t');
    if (f.length !== header.length) fail(`${name}:${i + 2 + meta.length}: ${f.length} fields, header has ${header.length}`);
    if (seen.has(line)) fail(`${name}:${i + 2 + meta.length}: duplicate row`);
    seen.add(line);
    if (f.some((v) => v !== v.trim())) fail(`${name}:${i + 2 + meta.length}: field with leading or trailing space`);
    const o = {};
    header.forEach((h, j) => { o[h] = f[j]; });
    o.line = i + 2 + meta.length;
    rows.push(o);
  });
  return { header, rows, meta };
}

/** Text as compared across releases: case, punctuation and spacing are not changes. */
const norm = (s) => s.toLowerCase().normalize('NFKD').replace(/[\u0300-\u036f]/g, '').replace(/[^a-z0-9]+/g, ' ').trim();

function loadRel(tag) {
  const { rows } = readTsv(`release-${tag}.tsv`);
  const concepts = new Map();
  const termIds = new Map();
  for (const r of rows) {
    if (!validId(r.concept_id, CONCEPT_ID_RE)) fail(`release-${tag}:${r.line}: bad concept id ${r.concept_id}`);
    if (!validId(r.term_id, TERM_ID_RE)) fail(`release-${tag}:${r.line}: bad term id ${r.term_id}`);
    if (!['preferred', 'synonym'].includes(r.term_type)) fail(`release-${tag}:${r.line}: term_type ${r.term_type}`);
    if (!['active', 'inactive'].includes(r.status)) fail(`release-${tag}:${r.line}: status ${r.status}`);
    if (!Object.values(CATEGORY).includes(r.category)) fail(`release-${tag}:${r.line}: category ${r.category}`);
    if (termIds.has(r.term_id)) fail(`release-${tag}:${r.line}: term_id ${r.term_id} also on line ${termIds.get(r.term_id)}`);
    termIds.set(r.term_id, r.line);
    let c = concepts.get(r.concept_id);
    if (!c) { c = { id: r.concept_id, status: r.status, category: r.category, terms: [], parents: [] }; concepts.set(r.concept_id, c); }
    if (c.status !== r.status || c.category !== r.category) fail(`release-${tag}:${r.line}: status/category differ within ${r.concept_id}`);
    c.terms.push({ text: r.term, type: r.term_type, termId: r.term_id, lang: r.language });
  }
  for (const c of concepts.values()) {
    const langs = new Set(c.terms.map((t) => t.lang));
    for (const lang of langs) {
      const ts = c.terms.filter((t) => t.lang === lang);
      const pref = ts.filter((t) => t.type === 'preferred').length;
      if (pref !== 1) fail(`release-${tag}: ${c.id} has ${pref} preferred terms in ${lang}`);
      if (ts.length > 6) fail(`release-${tag}: ${c.id} has ${ts.length - 1} synonyms in ${lang} (max 5)`);
      const ns = new Set();
      for (const t of ts) { if (ns.has(norm(t.text))) fail(`release-${tag}: ${c.id} repeats "${t.text}"`); ns.add(norm(t.text)); }
    }
    c.en = new Set(c.terms.filter((t) => t.lang === 'en').map((t) => norm(t.text)));
  }
  const owner = new Map();
  for (const c of concepts.values()) {
    if (c.status !== 'active') continue;
    for (const t of c.en) {
      if (owner.has(t)) fail(`release-${tag}: "${t}" is active in both ${owner.get(t)} and ${c.id}`);
      owner.set(t, c.id);
    }
  }
  const h = readTsv(`hierarchy-${tag}.tsv`).rows;
  for (const r of h) {
    const c = concepts.get(r.concept_id);
    const p = concepts.get(r.parent_id);
    if (!c || c.status !== 'active') fail(`hierarchy-${tag}:${r.line}: child ${r.concept_id} not an active concept`);
    if (!p || p.status !== 'active') fail(`hierarchy-${tag}:${r.line}: parent ${r.parent_id} not an active concept`);
    if (c) c.parents.push(r.parent_id);
  }
  const roots = [...concepts.values()].filter((c) => c.status === 'active' && c.parents.length === 0);
  if (roots.length !== Object.keys(CATEGORY).length) fail(`hierarchy-${tag}: ${roots.length} roots, expected one per category`);
  // cycle check
  const state = new Map();
  const visit = (id) => {
    if (state.get(id) === 1) { fail(`hierarchy-${tag}: cycle through ${id}`); return; }
    if (state.get(id) === 2) return;
    state.set(id, 1);
    for (const p of concepts.get(id)?.parents ?? []) visit(p);
    state.set(id, 2);
  };
  for (const id of concepts.keys()) visit(id);
  return { tag, concepts, rows: rows.length, owner };
}

const activeIn = (rel, id) => rel.concepts.get(id)?.status === 'active';
const goneIn = (rel, id) => !activeIn(rel, id);
const sameSet = (a, b) => a.size === b.size && [...a].every((x) => b.has(x));
const quoted = (note) => { const m = /'(.+?)'/.exec(note); return m ? norm(m[1]) : null; };

function checkChanges(A, B, file) {
  const { rows } = readTsv(file);
  const mentioned = new Set();
  const movedOut = new Map(); // concept → set of norm terms that moved out under a moved_synonym row
  for (const r of rows) if (r.kind === 'moved_synonym') {
    const from = r.from; const t = quoted(r.note);
    if (!movedOut.has(from)) movedOut.set(from, new Set());
    movedOut.get(from).add(t);
  }
  const allA = new Set([...A.concepts.values()].flatMap((c) => [...c.en]));
  for (const r of rows) {
    const from = r.from ? r.from.split('|') : [];
    const to = r.to ? r.to.split('|') : [];
    from.forEach((x) => mentioned.add(x)); to.forEach((x) => mentioned.add(x));
    const where = `${file}:${r.line} ${r.kind}`;
    const a = (id) => A.concepts.get(id);
    const b = (id) => B.concepts.get(id);
    const bad = (msg) => fail(`${where}: ${msg}`);
    const carriedTo = (id) => { // where each A-term of id lives (active) in B
      const out = new Map();
      for (const t of a(id).en) { const o = B.owner.get(t); if (o) out.set(t, o); }
      return out;
    };
    switch (r.kind) {
      case 'addition': {
        const n = to[0];
        if (from.length || to.length !== 1) bad('shape');
        if (A.concepts.has(n)) bad(`${n} already in the old release`);
        if (!activeIn(B, n)) bad(`${n} not active in the new release`);
        else for (const t of b(n).en) if (allA.has(t)) bad(`term "${t}" existed before`);
        break;
      }
      case 'retirement': {
        const x = from[0];
        if (to.length || from.length !== 1 || !activeIn(A, x)) bad('shape or not active before');
        if (activeIn(B, x)) bad(`${x} still active`);
        const allowed = movedOut.get(x) ?? new Set();
        for (const [t, o] of carriedTo(x)) if (!allowed.has(t)) bad(`term "${t}" reappears in ${o}`);
        break;
      }
      case 'replacement': {
        const [x] = from; const [n] = to;
        if (A.concepts.has(n)) bad(`${n} existed before`);
        if (activeIn(B, x)) bad(`${x} still active`);
        const ct = carriedTo(x);
        if (ct.size !== a(x).en.size || [...ct.values()].some((o) => o !== n)) bad(`not all terms carried to ${n}`);
        break;
      }
      case 'merge': {
        const [s] = to;
        if (from.length < 2 || to.length !== 1) bad('shape');
        for (const x of from) {
          const ct = carriedTo(x);
          if (ct.size !== a(x).en.size || [...ct.values()].some((o) => o !== s)) bad(`terms of ${x} not all in ${s}`);
          if (x !== s && activeIn(B, x)) bad(`${x} still active`);
        }
        if (from.includes(s) ? !activeIn(B, s) : A.concepts.has(s)) bad(`survivor ${s} wrong status`);
        break;
      }
      case 'split': {
        const [x] = from;
        if (to.length < 2) bad('shape');
        const ct = carriedTo(x);
        const total = a(x).en.size;
        for (const p of to) {
          const got = [...ct.values()].filter((o) => o === p).length;
          if (!activeIn(B, p)) bad(`${p} not active`);
          if (got < 2 || got / total < 0.25) bad(`${p} gets only ${got} of ${total} terms`);
          if (p !== x && A.concepts.has(p)) bad(`${p} existed before`);
        }
        if ([...ct.values()].some((o) => !to.includes(o))) bad('terms leak outside the parts');
        if (!to.includes(x) && activeIn(B, x)) bad(`${x} still active`);
        break;
      }
      case 'moved_synonym': {
        const [x] = from; const [y] = to; const t = quoted(r.note);
        const tx = a(x).terms.find((z) => norm(z.text) === t);
        if (!tx || tx.type !== 'synonym') bad(`"${t}" not a synonym of ${x} before`);
        if (!activeIn(A, y) || !activeIn(B, y)) bad(`${y} not active in both`);
        if (B.owner.get(t) !== y) bad(`"${t}" not in ${y} after`);
        if (a(y).en.has(t)) bad(`"${t}" already in ${y}`);
        break;
      }
      case 'preferred_term_change': {
        const [x] = from;
        const pa = a(x).terms.find((z) => z.lang === 'en' && z.type === 'preferred');
        const pb = b(x).terms.find((z) => z.lang === 'en' && z.type === 'preferred');
        if (norm(pa.text) === norm(pb.text)) bad('preferred unchanged');
        const keeps = b(x).en.has(norm(pa.text));
        if (keeps !== /stays as a synonym/.test(r.note)) bad('note disagrees about the old preferred');
        for (const z of a(x).en) if (z !== norm(pa.text) && !b(x).en.has(z)) bad(`synonym "${z}" lost`);
        break;
      }
      case 'synonym_added':
      case 'synonym_removed': {
        const [x] = from; const t = quoted(r.note);
        const added = [...b(x).en].filter((z) => !a(x).en.has(z));
        const removed = [...a(x).en].filter((z) => !b(x).en.has(z));
        const want = r.kind === 'synonym_added' ? [added, removed] : [removed, added];
        if (want[0].length !== 1 || want[0][0] !== t || want[1].length) bad(`added ${added} removed ${removed}`);
        break;
      }
      case 'id_reuse': {
        // to = the reused id itself, then (if any) the new id that took over the old meaning
        const [x, ...moved] = from.length === 1 && to[0] === from[0] ? [from[0], ...to.slice(1)] : [null];
        if (!x) { bad('shape'); break; }
        if (!activeIn(A, x) || !activeIn(B, x)) bad('not active in both');
        else if ([...a(x).en].some((z) => b(x).en.has(z))) bad('terms overlap');
        else for (const t of b(x).en) if (allA.has(t)) bad(`new meaning's term "${t}" existed before`);
        const ct = carriedTo(x);
        if (moved.length > 1) bad('at most one new home for the old meaning');
        if (moved.length && (A.concepts.has(moved[0]) || ct.size !== a(x).en.size || [...ct.values()].some((o) => o !== moved[0]))) bad(`old meaning not wholly in new ${moved[0]}`);
        if (!moved.length && ct.size) bad('old terms survive elsewhere');
        break;
      }
      case 'category_change':
      case 'hierarchy_change': {
        const [x] = from;
        if (!sameSet(a(x).en, b(x).en)) bad('terms differ');
        const catDiff = a(x).category !== b(x).category;
        const parDiff = !sameSet(new Set(a(x).parents), new Set(b(x).parents));
        if (r.kind === 'category_change' ? !catDiff || parDiff : catDiff || !parDiff) bad('wrong kind of difference');
        break;
      }
      case 'reorganization': {
        if (from.length < 2 || to.length < 2) bad('shape');
        const sources = new Map(); // to-concept → set of from-concepts feeding it
        for (const x of from) for (const [, o] of carriedTo(x)) {
          if (!to.includes(o)) bad(`term of ${x} leaks to ${o}`);
          if (!sources.has(o)) sources.set(o, new Set());
          sources.get(o).add(x);
        }
        if (![...sources.values()].some((v) => v.size >= 2)) bad('no concept gathers terms from two old concepts');
        for (const p of to) if (!sources.has(p)) bad(`${p} receives nothing`);
        break;
      }
      default: bad('unknown kind');
    }
  }
  // Concepts no row names must be unchanged: status, category, parents, normalised terms.
  const quiet = [];
  for (const [id, ca] of A.concepts) {
    if (mentioned.has(id)) continue;
    const cb = B.concepts.get(id);
    if (!cb) { fail(`${file}: ${id} disappears but no row names it`); continue; }
    if (ca.status !== cb.status || ca.category !== cb.category || !sameSet(ca.en, cb.en) || !sameSet(new Set(ca.parents), new Set(cb.parents))) {
      fail(`${file}: ${id} changed but no row names it`);
    }
    const raw = (c) => c.terms.map((t) => `${t.lang}:${t.type}:${t.termId}:${t.text}`).sort().join('\n');
    if (raw(ca) !== raw(cb)) quiet.push(id);
    // term_id stability inside a kept concept
    for (const t of ca.terms) {
      const u = cb.terms.find((z) => z.termId === t.termId);
      if (!u || norm(u.text) !== norm(t.text)) fail(`${file}: term ${t.termId} of ${id} not kept`);
    }
  }
  for (const id of B.concepts.keys()) if (!A.concepts.has(id) && !mentioned.has(id)) fail(`${file}: new concept ${id} not named by any row`);
  // term_id: a term kept in a continuing concept keeps its id
  for (const [id, ca] of A.concepts) {
    const cb = B.concepts.get(id);
    if (!cb || ca.status !== 'active' || cb.status !== 'active') continue;
    for (const t of ca.terms) {
      const u = cb.terms.find((z) => z.lang === t.lang && norm(z.text) === norm(t.text));
      if (u && u.termId !== t.termId) fail(`${file}: "${t.text}" stays in ${id} but its term_id changed`);
    }
  }
  // moved terms: kept vs new term_id
  let kept = 0, renewed = 0;
  for (const [id, ca] of A.concepts) {
    if (ca.status !== 'active') continue;
    for (const t of ca.terms.filter((z) => z.lang === 'en')) {
      const o = B.owner.get(norm(t.text));
      if (!o || o === id) continue;
      const u = B.concepts.get(o).terms.find((z) => norm(z.text) === norm(t.text));
      if (u.termId === t.termId) kept++; else renewed++;
    }
  }
  return { rows, quiet, kept, renewed };
}

function checkHistory(A, B, file, changes) {
  const { rows } = readTsv(file);
  let disagreements = 0;
  for (const r of rows) {
    if (!['replaced_by', 'consider', 'same_as'].includes(r.relation)) fail(`${file}:${r.line}: relation ${r.relation}`);
    if (!activeIn(A, r.old_id)) fail(`${file}:${r.line}: ${r.old_id} not active in the old release`);
    if (activeIn(B, r.old_id)) fail(`${file}:${r.line}: ${r.old_id} still active`);
    if (!activeIn(B, r.new_id)) fail(`${file}:${r.line}: ${r.new_id} not active in the new release`);
    if (r.relation === 'consider' || !activeIn(A, r.old_id)) continue;
    const terms = [...A.concepts.get(r.old_id).en];
    const at = terms.filter((t) => B.owner.get(t) === r.new_id).length;
    if (at / terms.length < 0.5) disagreements++;
  }
  if (disagreements !== 1) fail(`${file}: ${disagreements} rows disagree with the terms, expected exactly 1`);
  const events = changes.filter((c) => ['retirement', 'replacement', 'merge'].includes(c.kind));
  const covered = events.filter((c) => c.from.split('|').some((x) => rows.some((h) => h.old_id === x)));
  return { rows: rows.length, covered: covered.length, events: events.length, disagreements };
}

function checkMappings(A, B, changes) {
  const m = readTsv('mappings.tsv').rows;
  const v = readTsv('expected-verdicts-r1-r2.tsv').rows;
  const s = readTsv('mappings.sssom.tsv', { comments: true });
  const byCode = new Map(v.map((r) => [r.local_code, r]));
  if (v.length !== m.length || byCode.size !== m.length) fail('verdicts: not one row per mapping');
  const codes = new Set();
  const usage = [];
  const role = new Map(); // concept → list of {kind, row}
  for (const c of changes) for (const x of c.from.split('|').filter(Boolean)) {
    if (!role.has(x)) role.set(x, []);
    role.get(x).push(c);
  }
  for (const c of changes) if (c.kind === 'moved_synonym') {
    if (!role.has(c.to)) role.set(c.to, []);
    role.get(c.to).push({ ...c, kind: 'moved_synonym_target' });
  }
  let unchangedTargets = 0;
  const touchedKinds = new Set();
  for (const r of m) {
    if (codes.has(r.local_code)) fail(`mappings:${r.line}: duplicate code`);
    codes.add(r.local_code);
    if (!/^(LAB|MIC|DXP|ALG|RAD|PRC)-\d{4}$/.test(r.local_code)) fail(`mappings:${r.line}: code style ${r.local_code}`);
    if (!['exact', 'broad', 'narrow', 'related'].includes(r.relation)) fail(`mappings:${r.line}: relation`);
    if (!/^[1-9]\d*$/.test(r.usage)) fail(`mappings:${r.line}: usage`);
    usage.push(Number(r.usage));
    const vr = byCode.get(r.local_code);
    if (!vr) continue;
    const inA = A.concepts.has(r.target_id);
    if ((vr.verdict === 'unknown_target') !== !inA) fail(`verdicts:${vr.line}: unknown_target vs presence in r1`);
    const kinds = (role.get(r.target_id) ?? []).map((c) => c.kind);
    kinds.forEach((k) => touchedKinds.add(k));
    if (inA && kinds.length === 0) unchangedTargets++;
    const succ = vr.successor;
    const ok = (cond, why) => { if (!cond) fail(`verdicts:${vr.line} ${r.local_code}: ${why} (verdict ${vr.verdict}, kinds ${kinds.join(',') || 'none'})`); };
    if (['ok', 'broken', 'unknown_target'].includes(vr.verdict)) ok(succ === '', 'successor must be empty');
    else if (vr.verdict !== 'drifted') ok(activeIn(B, succ), 'successor must be active in r2');
    const chg = (k) => (role.get(r.target_id) ?? []).find((c) => c.kind === k);
    switch (vr.verdict) {
      case 'ok': ok(kinds.every((k) => ['synonym_added', 'synonym_removed', 'preferred_term_change', 'moved_synonym', 'moved_synonym_target'].includes(k) || (k === 'merge' && chg('merge').to === r.target_id)), 'ok needs a meaning-preserving change'); break;
      case 'broken': ok(kinds.includes('retirement'), 'broken needs a retirement'); break;
      case 'redirect': { const c = chg('replacement') ?? chg('merge'); ok(c && c.to === succ && c.to !== r.target_id, 'redirect needs a replacement/merge to the successor'); break; }
      case 'ambiguous': { const c = chg('split') ?? chg('reorganization'); ok(c && c.to.split('|').includes(succ), 'ambiguous needs a split/reorganization with the successor among the parts'); break; }
      case 'drifted': {
        if (kinds.includes('id_reuse')) { const c = chg('id_reuse'); ok(succ === (c.to.split('|')[1] ?? ''), 'drifted successor must be where the old meaning went'); }
        else { const c = chg('moved_synonym'); ok(c && c.to === succ, 'drifted needs id_reuse or a moved synonym to the successor'); }
        break;
      }
      case 'context_changed': ok((kinds.includes('category_change') || kinds.includes('hierarchy_change')) && succ === r.target_id, 'context_changed'); break;
      case 'unknown_target': break;
      default: ok(false, 'unknown verdict');
    }
  }
  // SSSOM mirrors mappings.tsv
  if (s.rows.length !== m.length) fail('sssom: row count differs');
  const prefixes = new Set(s.meta.filter((l) => /^# {2}[A-Za-z]+: /.test(l)).map((l) => l.slice(3).split(':')[0]));
  const builtin = new Set(['owl', 'rdf', 'rdfs', 'semapv', 'skos', 'sssom', 'xsd', 'linkml']);
  s.rows.forEach((r, i) => {
    const mr = m[i];
    if (r.subject_id !== `FHGH:${mr.local_code}` || r.object_id !== `QCV:${mr.target_id}` || r.subject_label !== mr.local_label || r.usage_count !== mr.usage || r.owner !== mr.owner) fail(`sssom:${r.line}: differs from mappings.tsv`);
    for (const curie of [r.subject_id, r.predicate_id, r.object_id, r.mapping_justification]) {
      const p = curie.split(':')[0];
      if (!builtin.has(p) && !prefixes.has(p)) fail(`sssom:${r.line}: undeclared prefix ${p}`);
    }
  });
  if (!s.meta.some((l) => l.startsWith('#mapping_set_id: https://example.org/'))) fail('sssom: mapping_set_id');
  if (!s.meta.some((l) => l.startsWith('#license: https://'))) fail('sssom: license');
  usage.sort((a, b) => a - b);
  return {
    count: m.length, unchangedTargets, unknown: v.filter((r) => r.verdict === 'unknown_target').length,
    touchedKinds, usage: { min: usage[0], median: usage[Math.floor(usage.length / 2)], max: usage[usage.length - 1] },
    verdicts: v.reduce((acc, r) => ((acc[r.verdict] = (acc[r.verdict] ?? 0) + 1), acc), {}),
  };
}

function checkAll() {
  const R = ['r1', 'r2', 'r3'].map(loadRel);
  const c12 = checkChanges(R[0], R[1], 'expected-changes-r1-r2.tsv');
  const c23 = checkChanges(R[1], R[2], 'expected-changes-r2-r3.tsv');
  const h2 = checkHistory(R[0], R[1], 'history-r2.tsv', c12.rows);
  const h3 = checkHistory(R[1], R[2], 'history-r3.tsv', c23.rows);
  const mp = checkMappings(R[0], R[1], c12.rows);
  const count = (rows) => rows.reduce((acc, r) => ((acc[r.kind] = (acc[r.kind] ?? 0) + 1), acc), {});
  const k12 = count(c12.rows); const k23 = count(c23.rows);
  for (const k of KIND_ORDER) if ((k12[k] ?? 0) < 2) fail(`r1-r2: only ${k12[k] ?? 0} ${k} rows`);
  for (const k of KIND_ORDER.slice(0, 9)) if ((k23[k] ?? 0) < 1) fail(`r2-r3: no ${k} row`);
  for (const k of KIND_ORDER) if (k !== 'addition' && !mp.touchedKinds.has(k)) fail(`mappings: no mapping touched by ${k}`);
  // Both retirement styles must occur.
  const styles = new Set(c12.rows.filter((r) => r.kind === 'retirement').map((r) => (R[1].concepts.has(r.from) ? 'inactive' : 'drop')));
  if (styles.size !== 2) fail('r1-r2: retirements do not use both styles');
  const summary = {
    releases: R.map((r) => ({ release: r.tag, concepts: r.concepts.size, active: [...r.concepts.values()].filter((c) => c.status === 'active').length, termRows: r.rows })),
    changes: { 'r1-r2': k12, 'r2-r3': k23 },
    termIdOnMove: { 'r1-r2': { kept: c12.kept, renewed: c12.renewed }, 'r2-r3': { kept: c23.kept, renewed: c23.renewed } },
    textOnlyEdits: { 'r1-r2': c12.quiet, 'r2-r3': c23.quiet },
    history: { 'r2': h2, 'r3': h3 },
    mappings: { ...mp, touchedKinds: [...mp.touchedKinds].sort() },
  };
  return summary;
}

// ---------------------------------------------------------------------------------------------

// The checks read only the files on disk, so --check needs no generation step.
if (!process.argv.includes('--check')) writeAll();
const summary = checkAll();
console.log(JSON.stringify(summary, null, 2));
if (problems.length) {
  console.error(`\n${problems.length} problem(s):\n${problems.map((p) => `  - ${p}`).join('\n')}`);
  process.exitCode = 1;
}
