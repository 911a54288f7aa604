// The take's drift: a robust straight line through the holds' deviations, with its standard error.
import { describe, expect, it } from 'vitest'
import { fitDrift } from '../../../server/analysis/drift'

const T = [0.1, 0.3, 0.5, 0.7, 0.9, 1.1]
const Y = [1.0, -0.6, -1.4, -3.6, -4.0, -6.2]

describe('fitDrift', () => {
  it('matches ordinary least squares when no point is an outlier', () => {
    // Reference values from scipy.stats.linregress(T, Y) (SciPy 1.17.1): slope −6.914285714,
    // stderr 0.516924447. Every residual is inside the Huber threshold, so the fits coincide.
    const f = fitDrift(T.map((t, i) => ({ tMin: t, cents: Y[i]!, errorCents: null })))
    expect(f.centsPerMin!).toBeCloseTo(-6.914285714, 6)
    expect(f.uncertaintyCentsPerMin!).toBeCloseTo(0.516924447, 6)
  })

  it('one wild hold does not tip the slope', () => {
    // The same line with the fourth point 40 ¢ off: least squares would move by
    // 40·(0.7 − 0.6)/Σ(t − t̄)² = 40·0.1/0.7 = 5.7 ¢/min (regression algebra, common practice).
    const y = [...Y]
    y[3] = y[3]! + 40
    const f = fitDrift(T.map((t, i) => ({ tMin: t, cents: y[i]!, errorCents: null })))
    expect(Math.abs(f.centsPerMin! - -6.914)).toBeLessThan(1.5)
  })

  it('two holds are too few: no figure and no uncertainty', () => {
    const f = fitDrift([{ tMin: 0.05, cents: 0.1, errorCents: 0.2 }, { tMin: 0.1, cents: 8.1, errorCents: 0.2 }])
    expect(f).toEqual({ centsPerMin: null, uncertaintyCentsPerMin: null })
  })

  it('a steady take (no trend, only scatter) gives no figure: the uncertainty exceeds the slope', () => {
    // Alternating ±2 ¢ about zero: the least-squares slope is small against its standard error.
    const y = T.map((_, i) => (i % 2 ? 2 : -2))
    const f = fitDrift(T.map((t, i) => ({ tMin: t, cents: y[i]!, errorCents: 0.3 })))
    expect(f.centsPerMin).toBeNull()
    expect(f.uncertaintyCentsPerMin!).toBeGreaterThan(0)
  })

  it('the holds\' own errors set a floor under the uncertainty', () => {
    // Points exactly on a line: residual variance 0, so the floor is the mean squared centre
    // error (1 ¢²) over Σ(t − t̄)² = 0.7 min²: √(1/0.7) = 1.195 ¢/min.
    const f = fitDrift(T.map(t => ({ tMin: t, cents: 10 * t, errorCents: 1 })))
    expect(f.centsPerMin!).toBeCloseTo(10, 6)
    expect(f.uncertaintyCentsPerMin!).toBeCloseTo(Math.sqrt(1 / 0.7), 6)
  })

  it('holds inside one second define no slope; NaN points are ignored', () => {
    expect(fitDrift([0, 0.002, 0.004].map(t => ({ tMin: t, cents: 1, errorCents: null }))).centsPerMin).toBeNull()
    const f = fitDrift([...T.map((t, i) => ({ tMin: t, cents: Y[i]!, errorCents: null })), { tMin: NaN, cents: 3, errorCents: null }])
    expect(f.centsPerMin!).toBeCloseTo(-6.914285714, 6)
  })
})
