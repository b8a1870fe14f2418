// autocannon ships no types; bench/load.ts describes the part it uses.
declare module 'autocannon'
