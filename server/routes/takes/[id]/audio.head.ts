// HEAD /takes/:id/audio: the GET route's status and headers without the body.
export { default } from './audio.get'
