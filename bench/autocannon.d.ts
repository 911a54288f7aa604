// autocannon ships no type declarations; bench/charts.ts passes options through and reads the
// figures it prints, so a loose shape is enough.
declare module 'autocannon' {
  namespace autocannon {
    type Options = Record<string, unknown>
  }
  function autocannon(opts: autocannon.Options): Promise<any>
  export = autocannon
}
