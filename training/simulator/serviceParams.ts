/** Physical parameters of one simulated service; drawn once per system. */
export interface ServiceParams {
  readonly requestRatePerS: number;
  readonly dailyAmplitude: number;
  readonly dailyPhaseRad: number;
  readonly trafficNoiseSigma: number;
  readonly cores: number;
  readonly cpuBase: number;
  readonly cpuPerLoad: number;
  readonly cpuNoiseSigma: number;
  readonly memBaseRatio: number;
  readonly memLimitBytes: number;
  readonly memNoiseSigma: number;
  readonly diskBase: number;
  readonly diskPerLoad: number;
  readonly serverLatencyS: number;
  readonly dependencyLatencyS: number;
  /** Share of a request's time spent waiting on the downstream dependency, 0..1. */
  readonly dependencyShare: number;
  /** How much disk slowness reaches request latency, 0..1. */
  readonly persistenceShare: number;
  readonly queueSensitivity: number;
  readonly errorBaseRatio: number;
  readonly poolSize: number;
  readonly poolBaseRatio: number;
  readonly bytesPerRequest: number;
  readonly retransPerRequest: number;
  /** Scale of heavy-tailed latency noise (the "p99 wobbles" of quiet periods). */
  readonly tailSigma: number;
  /** Per-step probability of a harmless heavy-tailed burst. */
  readonly burstProbability: number;
  /** Slow wander over hours (cache churn, tenant mix, neighbours), log scale; 0 = none. */
  readonly slowDriftSigma: number;
  /** Error ratio added per unit of latency beyond 8× normal (0 = timeouts never surface). */
  readonly timeoutSensitivity: number;
  /** Error ratio per unit of packet-loss fraction (most clients retry silently). */
  readonly lossErrorShare: number;
}
