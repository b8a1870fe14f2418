/** The parts of an OpenAPI 3.1 document the server publishes and the reference page reads. */
export const OPENAPI_METHODS = ['get', 'post', 'put', 'patch', 'delete'] as const
export interface OpenApiSchema { type?: string | string[], enum?: unknown[], format?: string, items?: OpenApiSchema, $ref?: string, description?: string, properties?: Record<string, OpenApiSchema>, required?: string[], maximum?: number, minimum?: number }
export interface OpenApiParam { name: string, in: string, required?: boolean, description?: string, schema?: OpenApiSchema }
export interface OpenApiOperation {
  summary?: string
  description?: string
  parameters?: OpenApiParam[]
  requestBody?: { required?: boolean, content?: Record<string, { schema?: OpenApiSchema }> }
  responses?: Record<string, { $ref?: string, description?: string, content?: Record<string, { schema?: OpenApiSchema }> }>
}
export type OpenApiPathItem = Partial<Record<typeof OPENAPI_METHODS[number], OpenApiOperation>> & { parameters?: OpenApiParam[] }
export interface OpenApiAnswer { $ref?: string, description?: string, content?: Record<string, { schema?: OpenApiSchema }> }
export interface OpenApiDocument { openapi: string, info: { title: string, version: string, description?: string }, paths: Record<string, OpenApiPathItem>, components?: { schemas?: Record<string, OpenApiSchema>, responses?: Record<string, OpenApiAnswer> } }
