/** The merged body's full mesh as OBJ (metres, contact frame). */
export default defineEventHandler(event => sendMergedMesh(event, 'obj'))
