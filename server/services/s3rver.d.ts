// s3rver ships no type declarations; object-store.ts types the little it uses.
declare module 's3rver'
