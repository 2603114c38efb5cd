export { default } from '../../../runs/[id]/cells/[index].get'
