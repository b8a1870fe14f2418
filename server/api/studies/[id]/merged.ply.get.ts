/** The merged body's full mesh as PLY (metres, contact frame). */
export default defineEventHandler(event => sendMergedMesh(event, 'ply'))
