import { existsSync, readdirSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { boxMesh, icosphere, mergeMeshes, twoSphereBody, writeObj, writePly } from '#shared/geometry'
import { prismPotential } from '../unit/geometry/gravity-references'
import { Agent } from './support/http'
import { uploadLobe } from './support/lobes'
import { startServer, type RunningServer } from './support/server'

const upload = uploadLobe

async function waitForSurface(agent: Agent, id: number, timeoutMs = 60_000) {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const lobe = (await agent.get(`/api/lobes/${id}`)).json
    const job = lobe.properties.gravityJob
    if (job?.status === 'done') return lobe
    if (job?.status === 'failed') throw new Error(`surface job failed: ${job.error}`)
    if (Date.now() > deadline) throw new Error(`surface job still ${job?.status} at ${job?.progress}`)
    await new Promise(r => setTimeout(r, 200))
  }
}

describe('lobe uploads through the API', () => {
  let server: RunningServer
  const as = {} as Record<'analyst' | 'viewer' | 'admin' | 'reviewer', Agent>
  beforeAll(async () => {
    server = await startServer({ ISTHMUS_DEMO: '1', ISTHMUS_MAX_UPLOAD_MB: '2', ISTHMUS_FIELD_POINTS: '400' })
    for (const who of ['analyst', 'viewer', 'admin', 'reviewer'] as const) {
      as[who] = new Agent(server.url)
      await as[who].signIn(`${who}@example.org`, 'isthmus-demo')
    }
  })
  afterAll(() => server?.dispose())

  it('computes the box closed form for an uploaded OBJ in km and answers the documented fields', async () => {
    // Box 2 × 1 × 0.5 km: V = 1 km³, I_x = M(Ly² + Lz²)/12 (textbook closed form).
    const res = await upload(as.analyst, writeObj(boxMesh(2, 1, 0.5)), 'slab.obj', { density: '1500', units: 'km' })
    expect(res.status, res.text).toBe(201)
    const lobe = res.json
    for (const k of ['id', 'name', 'sha256', 'format', 'units', 'vertexCount', 'faceCount', 'warnings', 'properties']) expect(lobe).toHaveProperty(k)
    for (const k of ['density', 'volume', 'surfaceArea', 'mass', 'centroid', 'inertia', 'principalMoments', 'principalAxes', 'equivalentRadius', 'ellipsoidSemiAxes', 'deeveSemiAxes', 'referenceRadius', 'J2', 'C22', 'C20Normalized', 'C22Normalized', 'maxRadius', 'escapeSpeedPointMass', 'escapeSpeedSurface', 'surfaceGravity', 'gravityJob']) {
      expect(lobe.properties).toHaveProperty(k)
    }
    expect(lobe.format).toBe('obj')
    expect(lobe.name).toBe('slab')
    const M = 1e9 * 1500
    expect(lobe.properties.volume).toBeCloseTo(1e9, -1)
    expect(lobe.properties.mass).toBeCloseTo(M, -4)
    const [A, B, C] = lobe.properties.principalMoments
    expect(A / (M * (1000 ** 2 + 500 ** 2) / 12)).toBeCloseTo(1, 10)
    expect(B / (M * (2000 ** 2 + 500 ** 2) / 12)).toBeCloseTo(1, 10)
    expect(C / (M * (2000 ** 2 + 1000 ** 2) / 12)).toBeCloseTo(1, 10)
    expect(lobe.properties.surfaceGravity).toBeNull()
    expect(['queued', 'running', 'done']).toContain(lobe.properties.gravityJob.status)
    // The stored file is named by its hash and nothing is left in the temporary folder.
    expect(readdirSync(join(server.dataDir, 'uploads', 'meshes'))).toContain(`${lobe.sha256}.obj`)
    expect(readdirSync(join(server.dataDir, 'uploads', 'tmp'))).toEqual([])

    const done = await waitForSurface(as.viewer, lobe.id)
    expect(done.properties.surfaceGravity.min).toBeGreaterThan(0)
    expect(done.properties.surfaceGravity.max).toBeGreaterThan(done.properties.surfaceGravity.min)
    expect(done.properties.escapeSpeedSurface.mean).toBeGreaterThan(0)
    // every face of the analysis mesh carries the field (issue 12, acceptance 4)
    expect(done.properties.surfaceEvaluation.points).toBe(lobe.faceCount)
    expect(done.properties.surfaceEvaluation.surface).toBe('mesh')
    expect(done.surface.evaluation.points).toBe(lobe.faceCount)
    expect(done.surface.meanGravity).toBeGreaterThan(0)
    const fields = await as.viewer.get(`/api/lobes/${lobe.id}/fields`)
    expect(fields.status).toBe(200)
    expect(fields.json.evaluation).toBe('mesh')
    for (const k of ['gravity', 'slopeDeg', 'geopotentialHeight', 'potential', 'escapeSpeed', 'gravitationalPotential', 'effectiveGravity']) expect(fields.json[k].length, k).toBe(lobe.faceCount)
    expect(fields.json.units.gravity).toBe('m s^-2')
    expect(fields.json.conventions.points).toMatch(/every face/)
    expect(fields.json.accuracy.estimated.maxRelativeGravity).toBeLessThan(1e-7)
    // the box's field at a face centroid: the closed-form prism potential (Nagy, Papp & Benedek 2000, J. Geodesy 74),
    // at every face centroid of the 2000 × 1000 × 500 m box (G = 6.67430e-11, density 1500)
    for (let f = 0; f < lobe.faceCount; f++) {
      const p: [number, number, number] = [fields.json.centroidX[f], fields.json.centroidY[f], fields.json.centroidZ[f]]
      expect(fields.json.gravitationalPotential[f] / (6.6743e-11 * 1500) / prismPotential(-1000, 1000, -500, 500, -250, 250, p)).toBeCloseTo(1, 8)
    }
    const display = await as.viewer.get(`/api/lobes/${lobe.id}/fields?on=display`)
    expect(display.status).toBe(200)
    expect(display.json.gravity.length).toBe(display.json.indices.length / 3)
    const csv = await as.viewer.get(`/api/lobes/${lobe.id}/fields.csv`)
    expect(csv.status).toBe(200)
    const rows = csv.text.trim().split('\r\n').filter((l: string) => !l.startsWith('#'))
    expect(rows[0]).toMatch(/^face,centroidX_m,centroidY_m,centroidZ_m,area_m2,/)
    expect(rows.length).toBe(lobe.faceCount + 1)
    const ply = await as.viewer.get(`/api/lobes/${lobe.id}/fields.ply`)
    expect(ply.status).toBe(200)
    expect(ply.text).toMatch(new RegExp(`element face ${lobe.faceCount}[\\s\\S]*property double gravity`))
    // coefficients: degree 2 in the principal frame equals the mass properties' J2 and C22 (MacCullagh, SCIENCE.md §2)
    const h = await as.viewer.get(`/api/lobes/${lobe.id}/harmonics?degree=8`)
    expect(h.status).toBe(200)
    for (const k of ['degree', 'referenceRadius', 'GM', 'frame', 'normalization', 'C', 'S', 'Cbar', 'Sbar']) expect(h.json).toHaveProperty(k)
    expect(h.json.degree).toBe(8)
    expect(-h.json.C[2][0] / done.properties.J2).toBeCloseTo(1, 10)
    expect(h.json.C[2][2] / done.properties.C22).toBeCloseTo(1, 10)
    expect(h.json.Cbar[2][0] / h.json.C[2][0]).toBeCloseTo(1 / Math.sqrt(5), 12)
    const txt = await as.viewer.get(`/api/lobes/${lobe.id}/harmonics?degree=4&format=txt`)
    expect(txt.text).toMatch(/reference radius R = .* m; GM = /)
    expect(txt.text).toMatch(/normalization: /)
    const hcsv = await as.viewer.get(`/api/lobes/${lobe.id}/harmonics?degree=4&format=csv`)
    expect(hcsv.text.split('\r\n').filter((l: string) => /^\d/.test(l)).length).toBe(15)
    expect((await as.viewer.get(`/api/lobes/${lobe.id}/harmonics?degree=500`)).status).toBe(422)
  })

  it('gives the same properties for PLY (binary) and OBJ of the same sphere, and scales with density without re-reading', async () => {
    const mesh = icosphere(3, 1.2)
    const obj = await upload(as.analyst, writeObj(mesh), 'ball.obj', { density: '800' })
    const ply = await upload(as.analyst, writePly(mesh, 'binary_little_endian', { double: true }), 'ball.ply', { density: '800' })
    expect(obj.status).toBe(201)
    expect(ply.status).toBe(201)
    expect(ply.json.format).toBe('ply')
    expect(ply.json.properties.volume / obj.json.properties.volume).toBeCloseTo(1, 12)
    expect(ply.json.properties.J2).toBeCloseTo(obj.json.properties.J2, 12)
    const patched = await as.analyst.patch(`/api/lobes/${obj.json.id}`, { density: 3200 })
    expect(patched.status).toBe(200)
    expect(patched.json.properties.mass / obj.json.properties.mass).toBeCloseTo(4, 12)
    expect(patched.json.properties.escapeSpeedPointMass / obj.json.properties.escapeSpeedPointMass).toBeCloseTo(2, 12)
    expect(patched.json.properties.J2).toBe(obj.json.properties.J2)
    // Another member's lobe: only the owner or an admin may change it.
    expect((await as.reviewer.patch(`/api/lobes/${obj.json.id}`, { density: 1000 })).status).toBe(403)
  })

  it('rejects bad meshes with 422 naming the problem, oversize with 413, and stays up', async () => {
    const open = boxMesh(1, 1, 1)
    const holed = { positions: open.positions, indices: open.indices.slice(0, open.indices.length - 3) }
    const cases: [Uint8Array, string, number, RegExp][] = [
      [writeObj(holed), 'open.obj', 422, /open|boundary/i],
      [new TextEncoder().encode(''), 'empty.obj', 422, /empty/i],
      [new TextEncoder().encode('ply\nformat ascii 1.0\nelement vertex 4000000000\nproperty float x\nend_header\n'), 'absurd.ply', 422, /.+/],
      [new Uint8Array(Array.from({ length: 4096 }, (_, i) => (i * 7919) % 256)), 'noise.ply', 422, /.+/],
      [new Uint8Array(3 * 1024 * 1024), 'huge.obj', 413, /larger than the limit/],
    ]
    for (const [bytes, name, status, msg] of cases) {
      const res = await upload(as.analyst, bytes, name, { density: '1000' })
      expect(res.status, `${name}: ${res.text.slice(0, 200)}`).toBe(status)
      expect(res.json?.message ?? res.text).toMatch(msg)
      if (status === 422) expect(Array.isArray(res.json.data.issues)).toBe(true)
    }
    const badDensity = await upload(as.analyst, writeObj(boxMesh(1, 1, 1)), 'box.obj', { density: '0' })
    expect(badDensity.status).toBe(422)
    expect(badDensity.json.data.issues[0].path).toBe('density')
    // The message names the field as the form does; the path stays the field name.
    expect(badDensity.json.message).toBe('Invalid upload fields: Bulk density: must be at least 1 kg m⁻³')
    const badSpin = await upload(as.analyst, writeObj(boxMesh(1, 1, 1)), 'box.obj', { density: '500', spinPeriodHours: '-3' })
    expect(badSpin.status).toBe(422)
    expect(badSpin.json.data.issues.map((i: { path: string }) => i.path)).toEqual(['spinPeriodHours'])
    expect(badSpin.json.message).toContain('Spin period: must be positive (h)')
    expect(badSpin.json.message).not.toContain('spinPeriodHours')
    expect(readdirSync(join(server.dataDir, 'uploads', 'tmp'))).toEqual([])
    expect((await as.viewer.get('/api/health')).status).toBe(200)
  })

  it('names faces by the file numbering, says once what is wrong with garbage or a bad PLY header, without function names', async () => {
    // A unit cube of six quads without its top (file face 1): the four side quads (file faces 1–4
    // of the remaining five) carry the open rim (geometry of a cube; common practice, no source).
    const V = 'v 0 0 0\nv 1 0 0\nv 0 1 0\nv 1 1 0\nv 0 0 1\nv 1 0 1\nv 0 1 1\nv 1 1 1\n'
    const quads = ['1 3 4 2', '1 2 6 5', '3 7 8 4', '1 5 7 3', '2 4 8 6'].map(q => `f ${q}\n`).join('')
    const open = await upload(as.analyst, new TextEncoder().encode(V + quads), 'open5.obj', { density: '1000' })
    expect(open.status).toBe(422)
    expect(open.json.data.code).toBe('open-mesh')
    expect(new Set(open.json.data.issues.map((i: { path: string }) => i.path))).toEqual(new Set(['faces[1]', 'faces[2]', 'faces[3]', 'faces[4]']))
    expect(open.json.message).toMatch(/numbered from 0 in file order/)
    const garbage = await upload(as.analyst, new Uint8Array(Array.from({ length: 2048 }, (_, i) => (i * 7919 + 3) % 256)), 'garbage.obj', { density: '1000' })
    expect(garbage.status).toBe(422)
    expect(garbage.json.message).not.toMatch(/readMesh|readObj|readPly|validateMesh/)
    expect(garbage.json.data.issues).toEqual([])
    const header = await upload(as.analyst, new TextEncoder().encode('ply\nformat ascii 1.0\nelement vertex eight\nproperty float x\nend_header\n0 0 0\n'), 'badheader.ply', { density: '1000' })
    expect(header.status).toBe(422)
    expect(header.json.message).toBe('element vertex count "eight" is not a whole number (header line 3)')
  })

  it('warns when a spin makes loose material lift off, on the fraction of the surface the closed form gives', async () => {
    // Homogeneous sphere, spin axis through the centre: the normal component of g + centrifugal
    // is GM/R² − ω²R sin²θ, so material lifts off where sin²θ > q = GM/(ω²R³) = (P/P_crit)², with
    // P_crit = √(3π/(Gρ)) (strengthless-sphere breakup period, docs/contact-and-kinematics.md [derived]). That band
    // |cos θ| < √(1 − q) covers the area fraction √(1 − q) (sphere area is uniform in cos θ;
    // Archimedes' hat-box theorem, common practice, no source).
    const G = 6.6743e-11
    const rho = 1000
    const periodH = 2
    const q = (periodH * 3600) ** 2 / (3 * Math.PI / (G * rho))
    const res = await upload(as.analyst, writeObj(icosphere(4, 1)), 'fast.obj', { density: String(rho), units: 'km', spinPeriodHours: String(periodH) })
    expect(res.status, res.text).toBe(201)
    const done = await waitForSurface(as.viewer, res.json.id, 120_000)
    expect(done.properties.slopeDeg.max).toBeGreaterThan(90)
    // icosphere facets and 400 evaluation points: a few per cent of the band edge (resolution, not tolerance loosening)
    expect(Math.abs(done.properties.liftOff.areaFraction - Math.sqrt(1 - q))).toBeLessThan(0.04)
    expect(done.surfaceCautions.map((c: { code: string }) => c.code)).toEqual(['surface-lift-off'])
    expect(done.surfaceCautions[0].message).toMatch(/lift off/)
    // Without a spin nothing lifts off and there is no caution.
    const still = await as.analyst.patch(`/api/lobes/${res.json.id}`, { spinPeriodHours: null })
    expect(still.json.surfaceCautions).toEqual([])
    const calm = await waitForSurface(as.viewer, res.json.id, 120_000)
    expect(calm.properties.liftOff).toBeNull()
    expect(calm.surfaceCautions).toEqual([])
  })

  it('cautions about overhangs (slopes above 90° without spin) under a small lobe sitting on a large one', async () => {
    // A 0.3 km sphere whose centre is 1.25 km from a 1 km sphere's: under the small one, the
    // large one's pull points away from the surface (slope near 180° at its underside; the
    // geometry of the two spheres, common practice, no source).
    const res = await upload(as.analyst, writeObj(twoSphereBody(1, 0.3, 1.25, 48)), 'pebble-on-boulder.obj', { density: '1500', units: 'km' })
    expect(res.status, res.text).toBe(201)
    const done = await waitForSurface(as.viewer, res.json.id, 120_000)
    expect(done.properties.slopeDeg.max).toBeGreaterThan(90)
    expect(done.surfaceCautions.map((c: { code: string }) => c.code)).toEqual(['surface-overhang'])
    expect(done.surfaceCautions[0].message).toMatch(/with no spin: gravity there points away from the surface/)
  })

  it('flags a mesh of two separate bodies: the warning, the count in the report and in the list item', async () => {
    // Two unit cubes 3 km apart: one file, two closed bodies.
    const two = mergeMeshes([boxMesh(1, 1, 1), boxMesh(1, 1, 1, [3, 0, 0])])
    const res = await upload(as.analyst, writeObj(two), 'pair.obj', { density: '1000', units: 'km', name: 'pair of cubes' })
    expect(res.status, res.text).toBe(201)
    expect(res.json.warnings.map((w: { code: string }) => w.code)).toContain('multiple-components')
    expect(res.json.report.components).toBe(2)
    // Both cubes as one rigid body: the centroid between them (textbook: mass-weighted mean).
    expect(res.json.properties.centroid[0]).toBeCloseTo(1500, 6)
    const list = await as.viewer.get('/api/lobes?q=pair%20of%20cubes')
    const item = list.json.items.find((i: { id: number }) => i.id === res.json.id)
    expect(item.properties.components).toHaveLength(2)
    expect(item.warnings.map((w: { code: string }) => w.code)).toContain('multiple-components')
  })

  it('warns when the size points at the wrong units (km read for a file in metres), and not for the same file in metres', async () => {
    // A 600 m sphere in a metre file, read as km: 1 200 km across (×1000, the units' definition).
    const bytes = writePly(icosphere(4, 600), 'binary_little_endian', { double: true })
    const km = await upload(as.analyst, bytes, 'big-by-mistake.ply', { density: '500', units: 'km' })
    expect(km.status, km.text).toBe(201)
    const size = km.json.warnings.find((w: { code: string }) => w.code === 'size-check')
    expect(size.message).toContain('the body is 1 200 km across')
    expect(size.message).toContain('were the coordinates in metres?')
    const m = await upload(as.analyst, bytes, 'big-by-mistake.ply', { density: '500', units: 'm' })
    expect(m.status, m.text).toBe(201)
    const codes = m.json.warnings.map((w: { code: string }) => w.code)
    expect(codes).not.toContain('size-check')
    // The same file read in the other units is named: one of the two readings is wrong.
    expect(m.json.warnings.find((w: { code: string }) => w.code === 'same-file').message).toContain(`read in kilometres as lobe #${km.json.id} 'big-by-mistake'`)
  })

  it('keeps a second upload of the same file as a lobe of its own, and warns naming the first', async () => {
    const bytes = writeObj(boxMesh(1.5, 1, 0.8))
    const first = await upload(as.analyst, bytes, 'twice.obj', { density: '800', units: 'km', name: 'first reading' })
    expect(first.status, first.text).toBe(201)
    expect(first.json.warnings.map((w: { code: string }) => w.code)).not.toContain('same-file')
    const second = await upload(as.analyst, bytes, 'twice.obj', { density: '2000', units: 'km' })
    expect(second.status, second.text).toBe(201)
    expect(second.json.id).not.toBe(first.json.id)
    expect(second.json.sha256).toBe(first.json.sha256)
    const w = second.json.warnings.find((x: { code: string }) => x.code === 'same-file')
    expect(w.message).toContain(`the same file as lobe #${first.json.id} 'first reading'`)
    expect(second.json.report.sameFile).toEqual([{ id: first.json.id, name: 'first reading', units: 'km' }])
    // The lobe page's source: the stored lobe carries it too.
    expect((await as.viewer.get(`/api/lobes/${second.json.id}`)).json.warnings).toContainEqual(w)
  })

  it('answers bad record addresses with the not-found page (404, our wording, a way back)', async () => {
    for (const path of ['/lobes/abc', '/studies/abc', '/objects/0', '/objects/-3/edit', '/studies/1.5', '/lobes/99999']) {
      // (an analyst: /objects/:id/edit needs that role, and the role check comes first)
      const res = await as.analyst.get(path, { accept: 'text/html' })
      expect(res.status, path).toBe(404)
      expect(res.text, path).toContain('Not found')
      expect(res.text, path).not.toMatch(/Invalid route parameter|Too small/)
    }
    const ok = await as.viewer.get('/studies')
    expect(ok.status).toBe(200)
  })

  it('lets only analysts and admins upload (role checked before the body), and only the owner or an admin delete', async () => {
    expect((await upload(as.viewer, writeObj(boxMesh(1, 1, 1)), 'v.obj', { density: '1000' })).status).toBe(403)
    expect((await upload(new Agent(server.url), writeObj(boxMesh(1, 1, 1)), 'anon.obj', { density: '1000' })).status).toBe(401)
    const mine = await upload(as.analyst, writeObj(boxMesh(1, 2, 3)), 'mine.obj', { density: '1000' })
    expect(mine.status).toBe(201)
    const list = await as.viewer.get('/api/lobes?sort=name&order=asc&limit=50')
    expect(list.status).toBe(200)
    expect(list.json.total).toBeGreaterThanOrEqual(1)
    const names: string[] = list.json.items.map((i: { name: string }) => i.name.toLowerCase())
    expect(names).toEqual([...names].sort())
    expect((await as.reviewer.delete(`/api/lobes/${mine.json.id}`)).status).toBe(403)
    expect((await as.viewer.delete(`/api/lobes/${mine.json.id}`)).status).toBe(403)
    expect((await as.analyst.delete(`/api/lobes/${mine.json.id}`)).status).toBe(200)
    expect((await as.viewer.get(`/api/lobes/${mine.json.id}`)).status).toBe(404)
  })

  it('keeps a lobe that a record cites (409, nothing deleted, nothing audited); the last lobe of a file takes the stored file with it', async () => {
    const cited = await upload(as.analyst, writeObj(boxMesh(2, 1, 1)), 'cited.obj', { density: '900' })
    expect(cited.status).toBe(201)
    const rec = await as.analyst.post('/api/objects', { designation: 'ZZ-DELETE-CHECK', name: 'Delete check', lobes: [cited.json.id] })
    expect(rec.status).toBe(201)
    const refused = await as.analyst.delete(`/api/lobes/${cited.json.id}`)
    expect(refused.status).toBe(409)
    expect(refused.json.message).toMatch(/cited by an object record/)
    expect((await as.viewer.get(`/api/lobes/${cited.json.id}`)).status).toBe(200)
    const audit = (await as.admin.get('/api/audit?limit=50')).json.items as { action: string, subjectId: string }[]
    expect(audit.some(e => e.action === 'lobe.deleted' && e.subjectId === String(cited.json.id))).toBe(false)

    const sql = server.sql()
    const storedPath = String((await sql.execute({ sql: 'select stored_path from mesh_files where sha256 = ?', args: [cited.json.sha256] })).rows[0]![0])
    expect(existsSync(join(server.env.UPLOADS_DIR!, storedPath))).toBe(true)
    expect((await as.analyst.patch(`/api/objects/${rec.json.id}`, { lobes: [] })).status).toBe(200)
    expect((await as.analyst.delete(`/api/lobes/${cited.json.id}`)).status).toBe(200)
    expect(existsSync(join(server.env.UPLOADS_DIR!, storedPath))).toBe(false)
    expect((await sql.execute({ sql: 'select count(*) from mesh_files where sha256 = ?', args: [cited.json.sha256] })).rows[0]![0]).toBe(0)
    const after = (await as.admin.get('/api/audit?limit=50')).json.items as { action: string, subjectId: string }[]
    expect(after.some(e => e.action === 'lobe.deleted' && e.subjectId === String(cited.json.id))).toBe(true)
  })

  it('exports JSON and CSV with full precision', async () => {
    const res = await upload(as.analyst, writeObj(icosphere(2, 0.7)), 'pebble.obj', { density: '1234.5' })
    const csv = await as.viewer.get(`/api/lobes/${res.json.id}/export.csv`)
    expect(csv.status).toBe(200)
    const volumeRow = csv.text.split('\r\n').find(l => l.startsWith('volume,'))!
    expect(Number(volumeRow.split(',')[1])).toBe(res.json.properties.volume)
    const json = await as.viewer.get(`/api/lobes/${res.json.id}/export.json`)
    expect(json.json.properties.J2).toBe(res.json.properties.J2)
    expect(json.json.provenance.sha256).toBe(res.json.sha256)
    const mesh = await fetch(`${server.url}/api/lobes/${res.json.id}/mesh`, { headers: { cookie: '' } })
    expect(mesh.status).toBe(401)
  })

  it('exports the inertia tensor, the frames, the file-frame degree-2 set and the harmonics, each with its unit and meaning', async () => {
    const res = await upload(as.analyst, writeObj(boxMesh(3, 2, 1)), 'brick.obj', { density: '2000', units: 'km' })
    const p = res.json.properties
    const rows = (await as.viewer.get(`/api/lobes/${res.json.id}/export.csv`)).text.split('\r\n')
    const cell = (q: string) => Number(rows.find(l => l.startsWith(`${q},`))!.split(',')[1])
    expect(cell('inertia[0][0]')).toBe(p.inertia[0][0])
    // box 3 × 2 × 1 km: I_xx = M(b² + c²)/12 (textbook closed form)
    expect(cell('inertia[0][0]')).toBeCloseTo(2000 * 6e9 * (4e6 + 1e6) / 12, -12)
    expect(cell('principalAxes[2][2]')).toBe(p.principalAxes[2][2])
    expect(cell('harmonics.C[2][0]')).toBe(p.harmonics.C[2][0])
    expect(cell('harmonics.normalized.C[4][0]')).toBe(p.harmonics.normalized.C[4][0])
    expect(rows.some(l => l.startsWith('degree2.C22,'))).toBe(true)
    const json = (await as.viewer.get(`/api/lobes/${res.json.id}/export.json`)).json
    expect(json.units).toMatchObject({ inertia: 'kg m²', harmonics: '—', degree2: '—' })
    expect(json.meanings.degree2).toMatch(/FILE frame/)
    expect(json.meanings.harmonics).toMatch(/principal frame/)
  })
})
