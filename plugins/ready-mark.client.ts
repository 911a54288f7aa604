// Marks the page once the app has taken it over (hydration finished): `<html data-app-ready>`.
// Until then the server-rendered form fields do not answer, and text typed into them is replaced
// by the app's own values when it starts; the browser tests wait for this mark before typing.
export default defineNuxtPlugin((nuxtApp) => {
  nuxtApp.hook('app:suspense:resolve', () => {
    document.documentElement.setAttribute('data-app-ready', '')
  })
})
