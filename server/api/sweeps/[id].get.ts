// A sweep is a run of kind 'sweep': the same handler serves both addresses.
export { default } from '../runs/[id].get'
