export { default } from '../../runs/[id]/events.get'
