// The plural lives with the planning module, which words its notes with the outer level's own name.
export { pluralOf } from '../../../shared/planning/plural-of'
