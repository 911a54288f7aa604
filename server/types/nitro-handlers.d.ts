// Nitro's list of route handlers, a virtual module of the build (nitropack's own runtime imports
// it the same way); only the fields the API route table reads are declared.
declare module '#nitro-internal-virtual/server-handlers' {
  export const handlers: { route?: string, method?: string, middleware?: boolean, lazy?: boolean }[]
}
