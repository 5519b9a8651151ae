/** Public face of the worker's recording readers. */
export { openFrameSource, DEFAULT_READ_BUFFER_BYTES, type OpenedFrameSource } from './open-frame-source.js';
export { buildElementRouting, frameSourceOptionsFromArray, ChannelMapError, type FrameSourceOptions, type ElementRouting } from './element-routing.js';
export { scanRecording, type ScanOptions, type ScanResult } from './scan-recording.js';
export { readRecordingDescription } from './read-recording-description.js';
export { SampleDecoder } from './sample-decoder.js';
export type { FrameSource } from './frame-source.js';
