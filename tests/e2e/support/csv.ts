import { execFileSync } from 'node:child_process'

/**
 * Parses CSV with Python's standard `csv` module (dialect "excel", RFC 4180 quoting): a reader
 * outside this project, so exports are checked against a general-purpose implementation.
 */
export function parseCsvWithPython(text: string): string[][] {
  const out = execFileSync('python3', ['-c', 'import csv,sys,json; print(json.dumps(list(csv.reader(sys.stdin.read().splitlines(True)))))'], { input: text })
  return JSON.parse(out.toString())
}
