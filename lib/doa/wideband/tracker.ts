/**
 * Bearing tracks from per-block bearings: global-nearest-neighbour gating with
 * one α–β filter per track (Kalata, "The tracking index: a generalized
 * parameter for α–β and α–β–γ target trackers", IEEE Trans. AES 20(2), 1984;
 * Bar-Shalom & Fortmann, Tracking and Data Association, 1988, for the gating
 * and nearest-neighbour association).
 *
 * State per track: bearing θ (degrees) and rate v (degrees per second). At each
 * block time t (the block's centre) every track predicts θ̂ = θ + v·Δt. A
 * measurement z may update a track when |z − θ̂| ≤ gate, with
 * gate = gateDeg + gateSigmas·σ_z + gateGrowthDegPerS·(t − t_last) (σ_z the block's ±σ,
 * t_last the time of the track's last point: the gate grows while a track coasts). Pairs inside the gates
 * are assigned greedily in order of increasing |z − θ̂| (each track and each
 * measurement at most once). An assigned track updates with the residual
 * r = z − θ̂: θ = θ̂ + α·r, v = v + β·r/Δt. The second point of a track sets
 * v from the two points (two-point initiation). Unassigned measurements start
 * tentative tracks. A tentative track becomes confirmed after `confirmHits`
 * points and is dropped when it misses a block before that; a confirmed track
 * coasts on its prediction through up to `maxMissed` blocks without a point
 * and ends after that. Only confirmed tracks are returned.
 *
 * Crossings: when two confirmed tracks are predicted within `mergeDeg` of each
 * other and exactly one measurement lies between them (± gateDeg), with no other
 * measurement in either gate, that measurement is taken as their merged,
 * unresolved peak. It updates neither and starts no track; both coast on their
 * predictions without counting a miss, keep their rates through the merge and
 * pick up their own bearings on the far side (a simple form of the
 * unresolved-measurement idea discussed by Bar-Shalom & Fortmann 1988). On entering
 * a merge, each track's rate is reset to the least-squares slope of its points of the
 * last `mergeRateWindowS` seconds, because the half-merged peaks of the approach pull
 * the α–β rate toward the other track.
 *
 * Defaults: α = 0.5 and β from Kalata's steady-state relation
 * β = 2(2 − α) − 4·√(1 − α) (= 0.172); gateDeg 2°, gateSigmas 3, confirmHits 3,
 * maxMissed 3, mergeDeg 6°, gateGrowthDegPerS 0.05, mergeRateWindowS 30. Identities survive a crossing as long as the rates differ.
 */
export interface TrackerOptions {
  alpha?: number;
  /** Default from α by Kalata's relation. */
  beta?: number;
  gateDeg?: number;
  gateSigmas?: number;
  confirmHits?: number;
  maxMissed?: number;
  /** Two tracks predicted this close (degrees) may share one unresolved peak; default 6 (bearingTimeRecord passes the array's Rayleigh gap, defaultMergeDeg). */
  mergeDeg?: number;
  /** The gate widens by this much per second since the track's last point (rate uncertainty while coasting); default 0.05 °/s. */
  gateGrowthDegPerS?: number;
  /** Entering a merge, the rate becomes the least-squares slope of the points of this many seconds; default 30. */
  mergeRateWindowS?: number;
}

export interface TrackInputBlock {
  /** Block time used for the track points (the centre of the block), seconds. */
  tS: number;
  bearingsDeg: number[];
  stdDeg?: number[];
}

export interface TrackPoint {
  tS: number;
  /** Filtered bearing, degrees. */
  bearingDeg: number;
  /** The block bearing that updated the track, degrees. */
  measuredDeg: number;
  blockIndex: number;
}

export interface Track {
  /** 1, 2, … in order of confirmation. */
  id: number;
  startS: number;
  endS: number;
  /** Least-squares slope of the measured bearings against time, degrees per second (0 for one point). */
  meanRateDegPerS: number;
  points: TrackPoint[];
}

export function kalataBeta(alpha: number): number {
  return 2 * (2 - alpha) - 4 * Math.sqrt(1 - alpha);
}

interface Working {
  theta: number;
  rate: number;
  lastT: number;
  hits: number;
  missed: number;
  confirmed: boolean;
  merging: boolean;
  id: number;
  points: TrackPoint[];
}

export function trackBearings(blocks: TrackInputBlock[], options: TrackerOptions = {}): Track[] {
  const alpha = options.alpha ?? 0.5;
  if (!(alpha > 0 && alpha <= 1)) throw new RangeError(`tracker alpha ${alpha} must lie in (0, 1]`);
  const beta = options.beta ?? kalataBeta(alpha);
  const gateDeg = options.gateDeg ?? 2;
  const gateSigmas = options.gateSigmas ?? 3;
  const confirmHits = options.confirmHits ?? 3;
  const maxMissed = options.maxMissed ?? 3;
  const mergeDeg = options.mergeDeg ?? 6;
  const gateGrowthDegPerS = options.gateGrowthDegPerS ?? 0.05;
  const mergeRateWindowS = options.mergeRateWindowS ?? 30;
  const active: Working[] = [];
  const finished: Working[] = [];
  let nextId = 1;

  blocks.forEach((block, blockIndex) => {
    const t = block.tS;
    const z = block.bearingsDeg;
    const pairs: { tr: number; me: number; dist: number }[] = [];
    for (let i = 0; i < active.length; i++) {
      const tr = active[i];
      const pred = tr.theta + tr.rate * (t - tr.lastT);
      for (let j = 0; j < z.length; j++) {
        const sigma = block.stdDeg?.[j];
        const gate =
          gateDeg +
          gateSigmas * (sigma !== undefined && Number.isFinite(sigma) ? sigma : 0) +
          gateGrowthDegPerS * (t - tr.lastT);
        const dist = Math.abs(z[j] - pred);
        if (dist <= gate) pairs.push({ tr: i, me: j, dist });
      }
    }
    // Unresolved measurements: two confirmed tracks whose predictions are within
    // mergeDeg of each other, no measurement in either gate except one measurement z
    // between them (± the gate). z is their merged peak: it updates neither, and
    // both coast without counting a miss.
    const merged = new Set<number>();
    const dropMeas = new Set<number>();
    const preds = active.map((tr) => tr.theta + tr.rate * (t - tr.lastT));
    for (let i1 = 0; i1 < active.length; i1++) {
      for (let i2 = i1 + 1; i2 < active.length; i2++) {
        if (!active[i1].confirmed || !active[i2].confirmed) continue;
        if (Math.abs(preds[i1] - preds[i2]) > mergeDeg) continue;
        const lo = Math.min(preds[i1], preds[i2]) - gateDeg;
        const hi = Math.max(preds[i1], preds[i2]) + gateDeg;
        const inside = z.map((v, j) => j).filter((j) => z[j] >= lo && z[j] <= hi);
        const gated = pairs.filter((p) => p.tr === i1 || p.tr === i2).map((p) => p.me);
        if (inside.length !== 1 || gated.some((j) => j !== inside[0])) continue;
        dropMeas.add(inside[0]);
        merged.add(i1);
        merged.add(i2);
      }
    }
    // Confirmed tracks first, then by distance.
    pairs.sort(
      (a, b) => Number(active[b.tr].confirmed) - Number(active[a.tr].confirmed) || a.dist - b.dist || a.tr - b.tr,
    );
    const trackUsed = new Set<number>();
    const measUsed = new Set<number>();
    for (const me of dropMeas) measUsed.add(me);
    // Entering a merge: coast on the least-squares rate of the last mergeRateWindowS seconds of
    // points, which the bias of the approaching, half-merged peaks disturbs less than the α–β rate.
    for (const i of merged) {
      const tr = active[i];
      if (tr.merging) continue;
      tr.merging = true;
      const recent = tr.points.filter((p) => p.tS >= tr.lastT - mergeRateWindowS);
      if (recent.length >= 3) tr.rate = slope(recent);
    }
    for (let i = 0; i < active.length; i++) if (!merged.has(i)) active[i].merging = false;
    for (const p of pairs) {
      if (trackUsed.has(p.tr) || measUsed.has(p.me) || merged.has(p.tr)) continue;
      trackUsed.add(p.tr);
      measUsed.add(p.me);
      const tr = active[p.tr];
      const dt = t - tr.lastT;
      const pred = tr.theta + tr.rate * dt;
      const r = z[p.me] - pred;
      if (tr.hits === 1) {
        tr.rate = dt > 0 ? (z[p.me] - tr.theta) / dt : 0;
        tr.theta = z[p.me];
      } else {
        tr.theta = pred + alpha * r;
        tr.rate += dt > 0 ? (beta * r) / dt : 0;
      }
      tr.lastT = t;
      tr.hits++;
      tr.missed = 0;
      tr.points.push({ tS: t, bearingDeg: tr.theta, measuredDeg: z[p.me], blockIndex });
      if (!tr.confirmed && tr.hits >= confirmHits) {
        tr.confirmed = true;
        tr.id = nextId++;
      }
    }
    // Misses.
    for (let i = active.length - 1; i >= 0; i--) {
      if (trackUsed.has(i) || merged.has(i)) continue;
      const tr = active[i];
      if (!tr.confirmed) {
        active.splice(i, 1);
        continue;
      }
      tr.missed++;
      if (tr.missed > maxMissed) {
        finished.push(tr);
        active.splice(i, 1);
      }
    }
    // New tentative tracks.
    for (let j = 0; j < z.length; j++) {
      if (measUsed.has(j)) continue;
      const tr: Working = {
        theta: z[j],
        rate: 0,
        lastT: t,
        hits: 1,
        missed: 0,
        confirmed: confirmHits <= 1,
        merging: false,
        id: 0,
        points: [{ tS: t, bearingDeg: z[j], measuredDeg: z[j], blockIndex }],
      };
      if (tr.confirmed) tr.id = nextId++;
      active.push(tr);
    }
  });
  for (const tr of active) if (tr.confirmed) finished.push(tr);
  return finished
    .filter((tr) => tr.confirmed)
    .sort((a, b) => a.id - b.id)
    .map((tr) => ({
      id: tr.id,
      startS: tr.points[0].tS,
      endS: tr.points[tr.points.length - 1].tS,
      meanRateDegPerS: slope(tr.points),
      points: tr.points,
    }));
}

function slope(points: TrackPoint[]): number {
  const n = points.length;
  if (n < 2) return 0;
  let st = 0;
  let sz = 0;
  for (const p of points) {
    st += p.tS;
    sz += p.measuredDeg;
  }
  const mt = st / n;
  const mz = sz / n;
  let num = 0;
  let den = 0;
  for (const p of points) {
    num += (p.tS - mt) * (p.measuredDeg - mz);
    den += (p.tS - mt) ** 2;
  }
  return den > 0 ? num / den : 0;
}
