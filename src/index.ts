// The public library API of psdgate, one name per line: the main jobs and the types their results are made
// of (DEVELOPERS.md, "The library's index"). Internals (thread helpers, accumulators, the pass's pieces, the
// queue) are imported from their own modules by the code that needs them, not offered here.

// Errors, units, version
export {
  InputError,
  formatInputError,
  EXIT,
  type InputErrorDetails,
  type ErrorPlace,
} from "./errors.js";
export {
  STANDARD_GRAVITY_M_PER_S2,
  accelFactor,
  type AccelUnit,
} from "./units.js";
export { VERSION } from "./version.js";
export {
  FINDING_CODES,
  type Finding,
  type FindingCode,
} from "./findings.js";
export {
  findingText,
  findingTexts,
} from "./report/findingTexts.js";

// Read a recording (and the other inputs: a PSD table, test identity, a service mix)
export { openTimeHistory } from "./read/openTimeHistory.js";
export type { CsvReadOptions } from "./read/csvTimeHistory.js";
export type { ChannelName } from "./read/channelChoice.js";
export type {
  RecordingInfo,
  ChannelInfo,
  TimeHistorySource,
} from "./read/timeHistory.js";
export {
  readPsdTable,
  type PsdTable,
} from "./read/psdTable.js";
export {
  loadTestMeta,
  type TestMeta,
} from "./read/testMeta.js";
export {
  loadServiceMix,
  type ServiceMix,
} from "./read/mixFile.js";

// Analyse: the one pass (psd, inspect) and Welch's estimate in memory
export {
  analyzeRecording,
  analyzeSource,
  type ChannelAnalysis,
  type RecordingAnalysis,
  type FrameWindow,
} from "./pass/analyzeRecording.js";
export type {
  AnalysisOptions,
  PassAccumulator,
} from "./pass/analysisOptions.js";
export type {
  ResolvedAnalysis,
  RecordingOptions,
} from "./pass/analysisOptions.js";
export {
  welchPsd,
  bandRms,
  type PsdEstimate,
} from "./estimate/spectral/psdEstimate.js";
export type { WelchOptions } from "./estimate/spectral/welchOptions.js";
export {
  WINDOW_NAMES,
  type WindowName,
} from "./estimate/spectral/windows.js";
export { welchDof } from "./estimate/spectral/welchDof.js";
export { chiSquareIntervalFactors } from "./estimate/statistics/distributions.js";

// Check against a test profile; profiles
export {
  checkRecording,
  loadProfile,
  CONTROL_RULES,
  type CheckResult,
  type CheckOptions,
  type ControlRule,
} from "./analyses/checkRecording.js";
export {
  parseProfile,
  profileLevel,
  profileMotion,
  type TestProfile,
  type ProfileSegment,
} from "./compare/testProfile.js";
export type { ToleranceBand } from "./read/profileFile.js";
export {
  judgeSpectrum,
  type Verdict,
  type ChannelCompliance,
  type Excursion,
} from "./compare/complianceCheck.js";
export { DECISION_RULE } from "./compare/decisionRule.js";

// Ride (ISO 2631-1)
export {
  rideRecording,
  type RideOptions,
  type RideResult,
  type RideAxis,
} from "./analyses/rideRecording.js";
export {
  WEIGHTING_NAMES,
  weightingMagnitude,
  type WeightingName,
} from "./weight/isoWeightings.js";
export {
  dailyExposure,
  DIRECTIVE_2002_44_EC,
  type DailyExposure,
} from "./compare/wholeBodyExposure.js";

// Transfer
export {
  analyzeTransfer,
  type TransferOptions,
  type TransferAnalysis,
  type TransferOutput,
} from "./analyses/analyzeTransfer.js";

// Respond (SDOF response spectra)
export {
  loadSpectrumSource,
  responseSpectra,
  compareResponses,
  type SpectrumSource,
  type ResponseOptions,
  type ResponseSpectra,
  type ResponseComparison,
} from "./analyses/responseSpectra.js";
export { milesRms } from "./estimate/response/sdofResponse.js";

// Derive a test profile from field recordings
export {
  deriveProfile,
  mixInputs,
  plainInputs,
  DERIVE_DEFAULTS,
  type DeriveOptions,
  type DeriveResult,
  type FieldRecordingInput,
  type FieldRecordingResult,
} from "./analyses/deriveProfile.js";

// Shock
export {
  shockRecording,
  type ShockOptions,
  type ShockResult,
} from "./analyses/shockRecording.js";
export {
  shockSpectrum,
  type ShockSpectrum,
} from "./estimate/response/shockResponse.js";

// Verify a record
export {
  verifyReport,
  type VerifyResult,
  type VerifyOptions,
} from "./verify/verifyReport.js";

// Synthesise a recording
export {
  synthesizeProfile,
  type SynthOptions,
  type SynthResult,
} from "./synth/synthesizeProfile.js";
export { GaussianNoise } from "./synth/gaussianNoise.js";

// Report writers (text, JSON, CSV, HTML) and the one way to write a file
export { psdText } from "./report/psdText.js";
export {
  psdJson,
  psdCsv,
} from "./report/psdJson.js";
export { psdHtml } from "./report/psdHtml.js";
export {
  checkText,
  checkJson,
} from "./report/checkReport.js";
export { checkCsv } from "./report/checkCsv.js";
export { checkHtml } from "./report/htmlReport.js";
export {
  profileText,
  profileJson,
} from "./report/profileText.js";
export {
  rideText,
  rideJson,
  rideCsv,
} from "./report/rideReport.js";
export { rideHtml } from "./report/rideHtml.js";
export {
  transferText,
  transferJson,
  transferCsv,
} from "./report/transferReport.js";
export { transferHtml } from "./report/transferHtml.js";
export {
  responseText,
  responseJson,
  responseCsv,
} from "./report/responseReport.js";
export { responseHtml } from "./report/responseHtml.js";
export {
  deriveText,
  deriveJson,
  profileDocumentText,
} from "./report/deriveReport.js";
export { deriveHtml } from "./report/deriveHtml.js";
export {
  shockText,
  shockJson,
  shockCsv,
} from "./report/shockReport.js";
export { shockHtml } from "./report/shockHtml.js";
export type { ReportContext } from "./report/reportPage.js";
export { writeAtomic } from "./report/writeAtomic.js";
export {
  createTimeHistoryWriter,
  type TimeHistoryWriter,
} from "./report/timeHistoryWriter.js";
