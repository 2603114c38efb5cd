export { default } from '../../runs/[id]/cancel.post'
