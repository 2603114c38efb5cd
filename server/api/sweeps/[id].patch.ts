// A sweep is a run of kind 'sweep': the same handler renames both.
export { default } from '../runs/[id].patch'
