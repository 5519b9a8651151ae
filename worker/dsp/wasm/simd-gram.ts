/**
 * Workspace of the SIMD group Gram (assembly/gram.ts) for covariance.ts: channel-major
 * re/im planes padded to an even number of channels and snapshots (the padding is zero, so it
 * adds nothing), and the kernel's output tile matrix. Workspaces are kept per shape (a job
 * uses one or two: its group size and, for MVDR training, the training block's length).
 */
import { instantiateKernels, kernelView, type KernelExports } from './simd-kernels.js';

export class SimdGram {
  /** Padded channel and snapshot counts this workspace was laid out for. */
  readonly channels: number;
  readonly count: number;
  readonly planeRe: Float64Array;
  readonly planeIm: Float64Array;
  /** Output: channels × channels complex, interleaved; only the upper triangle is meaningful. */
  readonly out: Float64Array;
  private readonly kernels: KernelExports;

  private constructor(kernels: KernelExports, channels: number, count: number) {
    this.kernels = kernels;
    this.channels = channels;
    this.count = count;
    const plane = channels * count;
    this.planeRe = kernelView(kernels, 0, plane);
    this.planeIm = kernelView(kernels, 8 * plane, plane);
    this.out = kernelView(kernels, 16 * plane, 2 * channels * channels);
  }

  /** Runs the kernel over the planes as they are filled now. */
  run(): void {
    const plane = this.channels * this.count;
    this.kernels.gramUpper(0, 8 * plane, 16 * plane, this.channels, this.count);
  }

  private static readonly byShape = new Map<number, SimdGram>();
  private static readonly MAX_SHAPES = 8;

  /**
   * The workspace for n channels and `count` snapshots (padded to even), or null when the
   * JavaScript kernels are in use. The planes' padding rows and columns must be zeroed by the
   * caller, who fills them anyway.
   */
  static forShape(n: number, count: number): SimdGram | null {
    const channels = n + (n & 1);
    const padded = count + (count & 1);
    const key = channels * 1_000_003 + padded;
    const known = SimdGram.byShape.get(key);
    if (known) return known;
    const kernels = instantiateKernels(16 * channels * padded + 16 * channels * channels);
    if (!kernels) return null;
    if (SimdGram.byShape.size >= SimdGram.MAX_SHAPES) SimdGram.byShape.delete(SimdGram.byShape.keys().next().value as number);
    const made = new SimdGram(kernels, channels, padded);
    SimdGram.byShape.set(key, made);
    return made;
  }
}
