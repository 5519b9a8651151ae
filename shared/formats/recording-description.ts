/**
 * What a header parser learned about a recording: enough to locate and convert every sample
 * without looking at the header again. The browser shows it before uploading; the server stores
 * it; the worker's frame source reads samples with it.
 */
import * as z from 'zod';
import { MAX_BASEBAND_SAMPLE_RATE_HZ, MAX_CHANNELS, MIN_SAMPLE_RATE_HZ } from './limits.js';
import { ENCODING_BYTES, SAMPLE_ENCODINGS } from './sample-encoding.js';

const finiteTriple = z.tuple([z.number().finite(), z.number().finite(), z.number().finite()]);

export const recordingDescriptionSchema = z
  .object({
    /** 'rf64' covers RF64 and BW64. */
    format: z.enum(['wav', 'rf64', 'sigmf', 'raw']),
    /** Name of the file whose header was parsed (the data file for WAV/RF64, the side file otherwise). */
    fileName: z.string(),
    sampleRate: z.number().finite().min(MIN_SAMPLE_RATE_HZ).max(MAX_BASEBAND_SAMPLE_RATE_HZ),
    channels: z.number().int().min(1).max(MAX_CHANNELS),
    /** Complex baseband: each sample is an (I, Q) pair, I first. */
    complex: z.boolean(),
    encoding: z.enum(SAMPLE_ENCODINGS),
    /** SigMF-style datatype string, e.g. "ri16_le" (also for WAV files, for display). */
    datatype: z.string(),
    /** Significant bits (WAV wValidBitsPerSample); equals the container width otherwise. */
    validBits: z.number().int().min(1).max(64),
    littleEndian: z.boolean(),
    /** Byte offset of the first sample in the data file. */
    dataOffset: z.number().int().min(0),
    /** Bytes of sample data (whole frames only). */
    dataBytes: z.number().int().min(0),
    /** Sample frames: one sample (or I/Q pair) per channel. */
    frames: z.number().int().min(0),
    /** interleaved: frame by frame; planar: all of channel 0, then all of channel 1, ... */
    layout: z.enum(['interleaved', 'planar']),
    /** Centre frequency (Hz) of complex baseband; 0 for real recordings. */
    centerFrequencyHz: z.number().finite(),
    /** Element positions (m) in Nullsmith's array frame (CONVENTIONS.md), one per file channel, when the file says. */
    elementPositionsM: z.array(finiteTriple).optional(),
    /** Raw side file only: for each element, which file channel feeds it. */
    elementChannels: z.array(z.number().int().min(0)).optional(),
    /** Linear gain per file channel from the side file's calibration (raw), applied when reading. */
    channelGains: z.array(z.number().finite().positive()).optional(),
    /** Multiplier applied after full-scale conversion (raw side file `scale`); 1 otherwise. */
    scale: z.number().finite().positive(),
    /** ISO 8601 UTC start time when the file states one. */
    startTimeUtc: z.string().optional(),
    /** SigMF core:sha512 of the data file, to verify after upload. */
    sha512: z.string().optional(),
    /** Things worth knowing that did not stop parsing (trailing bytes, extra chunks, ...). */
    warnings: z.array(z.string()),
  })
  .superRefine((d, ctx) => {
    const frameBytes = d.channels * (d.complex ? 2 : 1) * ENCODING_BYTES[d.encoding];
    if (d.dataBytes !== d.frames * frameBytes) {
      ctx.addIssue({ code: 'custom', path: ['dataBytes'], message: `dataBytes ${d.dataBytes} is not frames × ${frameBytes} bytes per frame` });
    }
  });

export type RecordingDescription = z.infer<typeof recordingDescriptionSchema>;

/** Bytes one frame occupies (all channels, both I and Q for complex). */
export function bytesPerFrame(d: Pick<RecordingDescription, 'channels' | 'complex' | 'encoding'>): number {
  return d.channels * (d.complex ? 2 : 1) * ENCODING_BYTES[d.encoding];
}

/** Duration in seconds. */
export function durationSeconds(d: Pick<RecordingDescription, 'frames' | 'sampleRate'>): number {
  return d.frames / d.sampleRate;
}
