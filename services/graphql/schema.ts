/**
 * GraphQL face: the same operations and field names as REST. Deep, rarely queried parts of a fit (Dunham
 * details, combination differences, cross-checks, model terms) travel as the JSON scalar with the REST shapes.
 */
export const typeDefs = /* GraphQL */ `
  "Any JSON value, with the same shape as the REST field of the same name."
  scalar JSON

  enum Branch {
    P
    Q
    R
  }

  "A vibrational level of a linear polyatomic molecule: quanta [v1, v2, v3] (C2H2: five) and |l|."
  input LevelInput {
    v: [Int!]!
    l: Int!
    "rank within a Fermi polyad (CO2 10001: 1, 10002: 2)"
    rank: Int
  }

  "Diatomic: band, branch, j. Linear polyatomic: upper, lower, branch, j (and parity when both levels have l ≥ 1)."
  input AssignmentInput {
    band: String
    upper: LevelInput
    lower: LevelInput
    "e or f: component of the lower level"
    parity: String
    branch: Branch!
    j: Int!
    species: String
  }

  input LineInput {
    "the caller's identifier of the line, a string or an integer (echoed in lines[].id)"
    id: JSON
    position: Float!
    uncertainty: Float
    intensity: Float
    "label of the instrument or file the line came from: lines without an uncertainty get σ from the scatter of their source"
    source: String
    assignment: AssignmentInput
  }

  "σ estimated from the residual scatter (robust) of one group of lines sent without an uncertainty"
  type ScatterGroup {
    group: String!
    "source, band or pooled"
    by: String!
    lines: Int!
    "cm-1"
    sigma: Float!
  }

  "One line source's wavenumber offset against the reference source"
  type SourceOffset {
    source: String!
    "fitted lines of this source"
    lines: Int!
    "this source's positions minus the reference's, cm-1; null when the shared levels do not determine it"
    offset: Quantity
  }

  type SourceOffsets {
    reference: String!
    "true: carried in the fit, so band origins and constants are free of the offsets and their σ include them"
    applied: Boolean!
    "flagged, flagged, reference unverified (not carried), asked, not flagged or not asked"
    basis: String!
    sources: [SourceOffset!]!
  }

  type ScaleOffset {
    "the lines' positions minus the absolute scale their bands fix (a loop of bands, a pure-rotation band), cm-1"
    offset: Quantity!
    "true: carried in the fit, so band origins and constants are free of it and their σ include it"
    applied: Boolean!
    "flagged, asked, not flagged or not asked"
    basis: String!
    bands: [String!]!
  }

  input FitOptionsInput {
    uncertaintyMode: String
    rejectionThreshold: Float
    maxRejectedFraction: Float
    termSignificance: Float
    maxCentrifugalOrder: Int
    massReducedDunham: Boolean
    temperature: Float
    maxOffset: Float
    structureBand: String
    "carry each source's offset against the reference source in the fit: true always, false never; default when one lies beyond 3σ"
    fitSourceOffsets: Boolean
    "the source the other sources' offsets are measured against (default: the one with most fitted lines)"
    referenceSource: String
  }

  input SpectrumInput {
    x: [Float!]!
    y: [Float!]!
    "absorbance (default) or transmittance"
    yUnit: String
    "cm-1 (default), um, nm"
    xUnit: String
  }

  input PeakOptionsInput {
    threshold: Float
    "gaussian, lorentzian or voigt (default)"
    shape: String
  }

  "Who measured what: echoed in the result and printed in reports."
  input SampleInput {
    id: String
    description: String
    instrument: String
    operator: String
    "ISO 8601 with a zone, or a date"
    measuredAt: String
    notes: String
  }

  type Sample {
    id: String
    description: String
    instrument: String
    operator: String
    measuredAt: String
    notes: String
  }

  "The software that computed a result (API-CONTRACT.md, additions)."
  type Software {
    name: String!
    version: String!
    libraryVersion: String!
  }

  "SHA-256 (hex) of the HTTP request body as received."
  type InputDigest {
    sha256: String!
  }

  input FitInput {
    species: String
    "cm-1 (default), MHz, GHz, THz, um, nm"
    unit: String
    "lines or spectrum, exactly one"
    lines: [LineInput!]
    spectrum: SpectrumInput
    peakOptions: PeakOptionsInput
    options: FitOptionsInput
    sample: SampleInput
  }

  type PeakOut {
    position: Float!
    uncertainty: Float!
    intensity: Float!
    width: Float!
    height: Float!
    lorentzianFraction: Float!
  }

  type PeaksResult {
    peaks: [PeakOut!]!
    points: Int!
    noise: Float!
    step: Float!
    notice: String!
  }

  type SpectrumSummary {
    points: Int!
    peaks: Int!
    noise: Float!
    step: Float!
  }

  type Quantity {
    value: Float!
    uncertainty: Float!
    unit: String!
  }

  type TermQuantity {
    value: Float!
    uncertainty: Float!
    unit: String!
    "diatomic: v of the reference level; linear polyatomic: its level key"
    relativeTo: JSON!
  }

  type NamedQuantity {
    name: String!
    value: Float!
    uncertainty: Float!
    unit: String!
    species: String
  }

  type SpeciesMass {
    formula: String!
    "diatomic species"
    reducedMass: Quantity
    "linear polyatomic species: molecular mass, u"
    mass: Quantity
  }

  type LinearLevel {
    v: [Int!]!
    l: Int!
    rank: Int
  }

  type LineAssignment {
    band: String!
    branch: Branch!
    j: Int!
    species: String!
    source: String!
    upper: LinearLevel
    lower: LinearLevel
    parity: String
    upperParity: String
    upperJ: Int
  }

  type LineOutcome {
    index: Int!
    "the caller's identifier of the line, as sent (a string or an integer)"
    id: JSON
    position: Float!
    "standard uncertainty of the position, cm-1: as sent, or from the peak fit; null when none was given or in a lean answer"
    uncertainty: Float
    intensity: Float
    "the instrument or file the line came from, as sent (null in a lean answer)"
    source: String
    assignment: LineAssignment
    calculated: Float
    residual: Float
    studentisedResidual: Float
    status: String!
    reason: String
  }

  type BandResult {
    species: String!
    band: String!
    origin: Quantity
    lines: Int!
    jRange: [Int!]!
    upper: LinearLevel
    lower: LinearLevel
    label: String
    "parallel or perpendicular"
    kind: String
  }

  type Level {
    species: String!
    "diatomic: v (Int); linear polyatomic: [v1, v2, v3] (or five quanta)"
    v: JSON!
    l: Int
    rank: Int
    label: String
    q: Quantity
    qJ: Quantity
    parity: String
    term: TermQuantity
    "absent only for a linear polyatomic level seen only through l-type transitions"
    B: Quantity
    D: Quantity
    H: Quantity
    L: Quantity
    M: Quantity
    r: Quantity
  }

  type Equilibrium {
    species: String!
    omega_e: Quantity
    omega_e_x_e: Quantity
    omega_e_y_e: Quantity
    B_e: Quantity
    alpha_e: Quantity
    gamma_e: Quantity
    D_e: Quantity
    beta_e: Quantity
    H_e: Quantity
    r_e: Quantity
  }

  type Matrix {
    parameters: [String!]!
    matrix: [[Float!]!]!
  }

  type Statistics {
    lines: Int!
    assigned: Int!
    fitted: Int!
    rejected: Int!
    unassigned: Int!
    parameters: Int!
    degreesOfFreedom: Int!
    rms: Float!
    reducedChiSquare: Float
    conditionNumber: Float
    uncertaintyMode: String!
  }

  type Warning {
    code: String!
    message: String!
    lines: [Int!]
  }

  type Calibration {
    offset: Quantity!
    scale: Quantity
    centre: Float!
    lines: Int!
    reference: String!
  }

  type BandSummary {
    species: String!
    band: String!
    predicted: Int!
    matched: Int!
  }

  type UnexplainedLine {
    index: Int!
    position: Float!
    intensity: Float
  }

  type IdentificationCandidate {
    species: String!
    name: String!
    score: Float!
    matched: Int!
    predicted: Int!
    offset: Float!
  }

  type AssignmentReport {
    method: String!
    species: [String!]!
    identification: [IdentificationCandidate!]
    calibration: Calibration
    bands: [BandSummary!]!
    unexplained: [UnexplainedLine!]!
  }

  type FitResult {
    species: [SpeciesMass!]!
    "linear polyatomic fits: the term-value formula and e/f sign convention"
    convention: String
    lines: [LineOutcome!]!
    bands: [BandResult!]!
    levels: [Level!]!
    equilibrium: [Equilibrium!]!
    parameters: [NamedQuantity!]!
    covariance: Matrix!
    correlation: Matrix!
    statistics: Statistics!
    "levelTerms, selection, and constraints (terms carried with a prior; their σ is in the covariance)"
    model: JSON!
    dunham: JSON!
    massReducedDunham: JSON
    combinationDifferences: JSON!
    crossChecks: JSON!
    "σ estimated from the residual scatter for the lines sent without an uncertainty (per source, band or pooled)"
    scatter: [ScatterGroup!]
    "lines of two or more sources: each source's wavenumber offset against the reference source"
    sourceOffsets: SourceOffsets
    "lines of one instrument whose bands fix the absolute scale: their common offset"
    scaleOffset: ScaleOffset
    assignment: AssignmentReport!
    spectrum: SpectrumSummary
    warnings: [Warning!]!
    notice: String!
    "present on the top-level result (absent on the fit nested in a check)"
    software: Software
    input: InputDigest
    sample: Sample
  }

  type SpeciesEntry {
    formula: String!
    name: String!
    state: String!
    reducedMass: Quantity!
    naturalAbundance: Float!
    derivedFrom: String
    hazard: String!
    "constant name → { value, unit, source, provenance, note }"
    constants: JSON!
    "safety caution: the service certifies nothing about a gas"
    notice: String!
  }

  "An entry of the linear polyatomic library (GET /v1/species/{formula} for CO2, 16O-12C-16O, …)."
  type LinearSpeciesEntry {
    "the chain along the axis, mass numbers first"
    formula: String!
    aliases: [String!]!
    name: String!
    kind: String!
    mass: Quantity!
    naturalAbundance: Float!
    modes: [String!]!
    hazard: String!
    "levels with G, B, D (H, q): each { value, uncertainty (null when unknown), unit, status, source, note }"
    levels: JSON!
    otherModes: JSON
    "source key → { cite, address }"
    sources: JSON!
    "safety caution: the service certifies nothing about a gas"
    notice: String!
  }

  type CheckEntry {
    id: String!
    status: String!
    measured: JSON!
    limit: JSON!
    message: String!
  }

  type CheckResult {
    verdict: String!
    checks: [CheckEntry!]!
    tolerances: JSON!
    fit: FitResult
    notice: String!
    software: Software!
    input: InputDigest!
    sample: Sample
  }

  input PredictionInput {
    species: String!
    "{ values: { omega_e: { value, uncertainty }, … }, covariance: { names, matrix } }"
    constants: JSON
    bands: [String!]
    "linear polyatomic: bands as [{ upper: { v, l }, lower: { v, l } }] (the REST bands objects)"
    levelBands: JSON
    "linear polyatomic: [{ v, l, G, B, D, H, q, qJ }] in cm-1"
    levels: JSON
    jMax: Int
    temperature: Float
    unit: String
    sample: SampleInput
  }

  type ConstantValue {
    name: String!
    value: Float!
    uncertainty: Float
    "linear library values: read, read-secondary, derived or recalled"
    status: String
    "linear library values: key(s) of sources, joined by +"
    source: String
  }

  "A predicted position: uncertainty is null when a constant it rests on has no published uncertainty."
  type PredictedQuantity {
    value: Float!
    uncertainty: Float
    unit: String!
  }

  type PredictedLine {
    band: String!
    branch: Branch!
    j: Int!
    position: PredictedQuantity!
    wavenumber: PredictedQuantity!
    relativeIntensity: Float!
    lowerEnergy: Float!
    upper: LinearLevel
    lower: LinearLevel
    upperJ: Int
    parity: String
    upperParity: String
  }

  type PredictionResult {
    species: String!
    source: String!
    constants: [ConstantValue!]!
    "linear library predictions: { key: { cite, address } } of the publications the values come from"
    sources: JSON
    lines: [PredictedLine!]!
    convention: String
    notice: String!
    software: Software!
    input: InputDigest!
    sample: Sample
  }

  input PotentialInput {
    "with constants (or the reference library): the species; with lines or a spectrum: optional, as for fit"
    species: String
    "{ values: { omega_e: { value, uncertainty }, … }, covariance: { names, matrix } }, as for predict"
    constants: JSON
    vMax: Int!
    "highest vibrational level the data behind the constants reached"
    vData: Int
    verify: Boolean
    "correct the curve until its Numerov levels give back G_v − G_0 and B_v (default: as verify)"
    refine: Boolean
    unit: String
    lines: [LineInput!]
    spectrum: SpectrumInput
    peakOptions: PeakOptionsInput
    options: FitOptionsInput
  }

  type PotentialLevel {
    v: Int!
    energy: Quantity!
    rMin: Quantity!
    rMax: Quantity!
    B: Quantity!
  }

  type MorseParameters {
    D_e: Quantity!
    a: Quantity!
    r_e: Quantity!
  }

  type CurvePoint {
    r: Float!
    energy: Float!
  }

  type PotentialCurves {
    rkr: [CurvePoint!]!
    morse: [CurvePoint!]!
  }

  type PotentialResult {
    species: String!
    source: String!
    reducedMass: Quantity!
    hbar2Over2mu: Float!
    vMax: Int!
    vData: Int
    levels: [PotentialLevel!]!
    morse: MorseParameters
    curves: PotentialCurves!
    "the Numerov check, with the REST shape"
    verification: JSON
    "the refined curve (turning points at its quantum levels, its own Numerov check), with the REST shape"
    refined: JSON
    warnings: [Warning!]!
    notice: String!
  }

  type Query {
    "QA checks of a line list against a tolerance profile (the same use case as POST /v1/checks)."
    check(input: FitInput!, tolerances: JSON): CheckResult!
    "Peaks of a spectrum (POST /v1/peaks)."
    peaks(spectrum: SpectrumInput!, peakOptions: PeakOptionsInput): PeaksResult!
    "Predicted lines with propagated uncertainties (POST /v1/predictions)."
    predict(input: PredictionInput!): PredictionResult!
    "RKR turning points and the Morse curve (POST /v1/potentials)."
    potential(input: PotentialInput!): PotentialResult!
    "Fit an assigned line list (the same use case as POST /v1/fits)."
    fit(input: FitInput!): FitResult!
    "The reference library, or one entry of it (GET /v1/species, GET /v1/species/{formula})."
    species(formula: String): [SpeciesEntry!]!
    "The linear polyatomic library, or one entry of it by chain or everyday formula (GET /v1/species: linear)."
    linearSpecies(formula: String): [LinearSpeciesEntry!]!
  }
`;
