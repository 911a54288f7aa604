// autocannon 9 ships no type declarations; the benchmark uses only these.
declare module 'autocannon' {
  namespace autocannon {
    interface Options { url: string, [option: string]: unknown }
  }
  function autocannon(opts: autocannon.Options): Promise<any>
  export = autocannon
}
