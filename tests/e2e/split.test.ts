import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { twoSphereBody, writePly } from '#shared/geometry'
import { Agent } from './support/http'
import { uploadLobe } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

// Two overlapping spheres as one body, in km: radii R1 = 1, R2 = 0.6, centres 0 and d = 1.4 on x.
const R1 = 1, R2 = 0.6, D = 1.4
// Sphere–sphere intersection plane x_i = (d² + R1² − R2²)/(2d) (Weisstein, MathWorld "Sphere-Sphere Intersection").
const XI = (D * D + R1 * R1 - R2 * R2) / (2 * D)
/** Spherical cap of height h on a sphere of radius R: V = πh²(3R − h)/3 (Weisstein, MathWorld "Spherical Cap"). */
const cap = (R: number, h: number) => Math.PI * h * h * (3 * R - h) / 3
const ball = (R: number) => 4 / 3 * Math.PI * R ** 3
const KM3 = 1e9
// Cut at x_i: the −x part is sphere 1 minus its cap beyond x_i; the +x part is sphere 2 minus its cap below x_i.
const V_NEG = (ball(R1) - cap(R1, R1 - XI)) * KM3
const V_POS = (ball(R2) - cap(R2, R2 - (D - XI))) * KM3
const twoSphereUnion = (around: number) => twoSphereBody(R1, R2, D, around)
// Inscribed polygons: the volume is low by about (2π/around)²/6 around and along the profile (7e-4 at 96).
const TOL = 3e-3

describe('split a whole-body lobe at a plane (POST /api/lobes/:id/split)', () => {
  let server: RunningServer
  const analyst = {} as { agent: Agent }
  let lobeId = 0
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_FIELD_POINTS: '200' })
    analyst.agent = new Agent(server.url)
    await analyst.agent.signIn('analyst@example.org', 'isthmus-demo')
    const res = await uploadLobe(analyst.agent, writePly(twoSphereUnion(96), 'binary_little_endian', { double: true }), 'two-spheres.ply', { density: '1500', units: 'km' })
    expect(res.status, res.text).toBe(201)
    lobeId = res.json.id
    // The uploaded union in m³: the two balls minus the lens, up to the mesh resolution.
    const lens = cap(R1, R1 - XI) + cap(R2, R2 - (D - XI))
    expect(Math.abs(res.json.properties.volume / ((ball(R1) + ball(R2) - lens) * KM3) - 1)).toBeLessThan(TOL)
  }, 120_000)
  afterAll(() => server?.dispose())

  async function volumes(lobes: { id: number }[]) {
    return Promise.all(lobes.map(async l => (await analyst.agent.get(`/api/lobes/${l.id}`)).json.properties.volume as number))
  }

  it('takes the plane point in metres also for a lobe uploaded in km; the parts match the spherical-cap volumes', async () => {
    const res = await analyst.agent.post(`/api/lobes/${lobeId}/split`, { plane: { point: [XI * 1000, 0, 0], normal: [1, 0, 0] } })
    expect(res.status, res.text).toBe(201)
    expect(res.json.lobes).toHaveLength(2)
    // The plane comes back in metres, where it was asked for.
    expect(res.json.plane.point[0]).toBeCloseTo(XI * 1000, 6)
    // Part A is the larger part: here the −normal side (sphere 1's), part B the +normal side.
    expect(res.json.lobes.map((l: { name: string }) => l.name)).toEqual(['two-spheres — part A', 'two-spheres — part B'])
    const [vA, vB] = await volumes(res.json.lobes)
    expect(Math.abs(vA! / V_NEG - 1)).toBeLessThan(TOL)
    expect(Math.abs(vB! / V_POS - 1)).toBeLessThan(TOL)
    // Reading the point as km (×1000 again) would put the plane 1.2e6 m away and leave no second part.
    const far = await analyst.agent.post(`/api/lobes/${lobeId}/split`, { plane: { point: [XI * 1e6, 0, 0], normal: [1, 0, 0] } })
    expect(far.status).toBe(422)
  }, 120_000)

  it('without a plane cuts at the neck, which for two spheres is the intersection circle', async () => {
    const res = await analyst.agent.post(`/api/lobes/${lobeId}/split`, {})
    expect(res.status, res.text).toBe(201)
    const n = res.json.plane.normal as number[]
    expect(Math.abs(n[0]!)).toBeGreaterThan(0.999)
    // The section area of the union is smallest at x_i (the circle where the spheres meet).
    expect(Math.abs(res.json.plane.point[0] - XI * 1000)).toBeLessThan(0.02 * 1000)
    const [v1, v2] = await volumes(res.json.lobes)
    // Each part names its parent and says that its cut face is synthetic.
    for (const [i, part] of (res.json.lobes as any[]).entries()) {
      // part A is the larger (sphere 1's, at smaller x): on the −normal side when the normal is +x
      const sideA = n[0]! > 0 ? '−normal' : '+normal', sideB = sideA === '−normal' ? '+normal' : '−normal'
      expect(part.report.origin).toMatchObject({ kind: 'cut', lobeId, lobeName: 'two-spheres', side: i === 0 ? sideA : sideB })
      expect(part.report.origin.plane.point[0]).toBe(res.json.plane.point[0])
      const cut = part.warnings.find((w: { code: string }) => w.code === 'cut-face')
      expect(cut.message).toContain(`Cut from lobe #${lobeId} 'two-spheres'`)
      expect(cut.message).toMatch(/synthetic/)
      // The plane's round-off (e.g. a y of 1e-14 m on a 1 km cut) reads as 0, the normal as the x axis.
      expect(cut.message).not.toMatch(/e-1\d/)
      // The neck area in the message is the section the split reports (m²), rounded to 4 digits.
      expect(cut.message).toContain(`(${Number(Math.abs(res.json.neckArea).toPrecision(4))} m²)`)
      expect((await analyst.agent.get(`/api/lobes/${part.id}`)).json.report.origin.lobeId).toBe(lobeId)
    }
    const small = Math.min(v1!, v2!), large = Math.max(v1!, v2!)
    expect(v1).toBe(large)
    // A plane shift δ changes the parts by about the neck area π(R1² − x_i²) δ: allow the 20 m above.
    const slack = Math.PI * (R1 * R1 - XI * XI) * 0.02 * KM3
    expect(Math.abs(small - V_POS)).toBeLessThan(TOL * V_POS + slack)
    expect(Math.abs(large - V_NEG)).toBeLessThan(TOL * V_NEG + slack)
  }, 120_000)
})
