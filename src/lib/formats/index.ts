export { FormatError, type FormatErrorWhere } from './format-error';
export { bytesSource, blobSource, readExactly, type ByteSource } from './byte-source';
export { microvoltFactor } from './units';
export {
  EDF_ANNOTATIONS_LABEL,
  EDF_FIXED_FIELDS,
  EDF_FIXED_HEADER_BYTES,
  EDF_SIGNAL_FIELDS,
  parseEdfFixedHeader,
  parseEdfHeader,
  parseEdfSignalHeaders,
  type EdfFixedHeader,
  type EdfHeader,
  type EdfIdentifying,
  type EdfSignalHeader,
  type EdfStart,
  type EdfVariant,
} from './edf-header';
export { parseTalBlock, type EdfAnnotation, type TalBlock } from './edf-annotations';
export {
  channelNamesFromLabels,
  openEdf,
  readEdfHeader,
  toRecording,
  type EdfChannel,
  type EdfFile,
  type EdfGap,
  type EdfIgnoredSignal,
  type EdfOutsideEvent,
  type OpenEdfOptions,
} from './edf-reader';
export { formatEdfNumber, writeEdf, type EdfWriteAnnotation, type EdfWriteInput, type EdfWriteSignal } from './edf-writer';
export { parseCsvSamples, type CsvSamplesOptions } from './csv-samples';
export { parseBidsEvents, type BidsEvent, type BidsEventsOptions, type BidsEventsResult } from './bids-events';
export { parseBidsChannels, type BidsChannel, type BidsChannelsResult } from './bids-channels';
export { fingerprintSource, Sha256, sha256Hex } from './fingerprint';
export { openCsvBlob, openEdfBlob, type CsvRequest, type EdfReading, type IntakeLocal, type IntakePhase, type IntakeProblem, type IntakeProgress, type IntakeResult } from './intake';
export { EVENTS_FILE_PREFIX, recordingWarnings, type RecordingWarningSources } from './recording-warnings';
