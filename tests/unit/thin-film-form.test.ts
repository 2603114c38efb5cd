// The editor's layer-stack logic (app/utils/thinFilmForm.ts) and the stack presets (app/utils/presets.ts): the
// scenario a stack design holds, the table edits, thinFilmSchema's messages by field, and the sweep axes.
import { describe, expect, it } from 'vitest'
import { reactive } from 'vue'
import { REFERENCE_GREEN_STACK, thinFilmSchema } from '../../shared/types/thin-film'
import { scenarioSchema } from '../../shared/types/scenario'
import {
  addLayer, applySheet, applyStack, checkStack, cloneStack, defaultStackAxis, duplicateLayer, moveLayer, removeLayer, setEmitting,
  stackAxisLabel, stackAxisOptions, stackEmitterIndex, stackFromInput, updateLayer, usesStack,
} from '../../app/utils/thinFilmForm'
import { BLUE_FLUORESCENT_STACK, DESIGN_PRESETS, presetScenario, scenarioTakesStack } from '../../app/utils/presets'

const green = () => stackFromInput(REFERENCE_GREEN_STACK)

describe('a design with the layer stack as its source', () => {
  it('holds the stack at emitter.thinFilm, has no reflector and takes the emitter index from the emitting layer', () => {
    const p = DESIGN_PRESETS.find((x) => x.id === 'green-stack')!
    const s = presetScenario(p)
    expect(s.reflector).toBeUndefined()
    expect(s.emitter.thinFilm!.layers.map((l) => l.name)).toEqual(['ITO', 'HTL', 'EML', 'ETL'])
    expect(s.emitter.index).toBe(1.75)
    expect(usesStack(s)).toBe(true)
    // the rest of the scenario is the sheet preset's, parsed with its defaults
    expect(s.lensArray).toMatchObject({ lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, index: 1.5 })
    expect(s.trace.fresnel).toBe('polarized')
  })

  it('both stack presets pass thinFilmSchema; the blue one has n 1.8 in its emitting layer and q 0.8', () => {
    expect(thinFilmSchema.safeParse(REFERENCE_GREEN_STACK).success).toBe(true)
    expect(thinFilmSchema.safeParse(BLUE_FLUORESCENT_STACK).success).toBe(true)
    const s = presetScenario(DESIGN_PRESETS.find((x) => x.id === 'blue-stack')!)
    expect(s.emitter.index).toBe(1.8)
    expect(s.emitter.thinFilm!.radiativeEfficiency).toBe(0.8)
  })

  it('sheet presets stay as they were: a reflector, no thinFilm', () => {
    for (const p of DESIGN_PRESETS.filter((x) => x.source === 'sheet')) {
      const s = presetScenario(p)
      expect(s.reflector).toEqual({ reflectance: 0.8, diffuseFraction: 0 })
      expect(usesStack(s)).toBe(false)
    }
  })

  it('switching to the stack removes the reflector and returns it; switching back restores it', () => {
    const d = presetScenario(DESIGN_PRESETS[0]!)
    d.reflector = { reflectance: 0.93, diffuseFraction: 0.1 }
    const removed = applyStack(d, green())
    expect(removed).toEqual({ reflectance: 0.93, diffuseFraction: 0.1 })
    expect('reflector' in d).toBe(false)
    applySheet(d, removed)
    expect(d.reflector).toEqual({ reflectance: 0.93, diffuseFraction: 0.1 })
    expect(d.emitter.thinFilm).toBeUndefined()
    // the stack's own n stays as the sheet's emitter index
    expect(d.emitter.index).toBe(1.75)
  })

  it('the scenario schema either keeps emitter.thinFilm or (before it knows the field) refuses the stack design', () => {
    const s = presetScenario(DESIGN_PRESETS.find((x) => x.id === 'green-stack')!)
    const r = scenarioSchema.safeParse(s)
    // Until the scenario carries emitter.thinFilm, a stack design has no reflector and is refused, never saved
    // silently as a sheet emitter without its stack.
    if (scenarioTakesStack()) expect(r.success && (r.data.emitter as { thinFilm?: unknown }).thinFilm).toBeTruthy()
    else expect(r.success).toBe(false)
  })
})

describe('layer table edits', () => {
  it('add, duplicate, move and remove keep the other rows and leave the input alone', () => {
    const tf = green()
    const before = JSON.stringify(tf)
    const added = addLayer(tf)
    expect(added.layers).toHaveLength(5)
    expect(added.layers[4]).toMatchObject({ thicknessNm: 20, material: { n: 1.75, k: 0 } })
    expect(added.layers[4]!.emitting).toBeUndefined()
    const moved = moveLayer(tf, 3, -1)
    expect(moved.layers.map((l) => l.name)).toEqual(['ITO', 'HTL', 'ETL', 'EML'])
    expect(moveLayer(tf, 0, -1).layers.map((l) => l.name)).toEqual(['ITO', 'HTL', 'EML', 'ETL'])
    expect(removeLayer(tf, 1).layers.map((l) => l.name)).toEqual(['ITO', 'EML', 'ETL'])
    const dup = duplicateLayer(tf, 2)
    expect(dup.layers.map((l) => l.name)).toEqual(['ITO', 'HTL', 'EML', 'EML copy', 'ETL'])
    expect(dup.layers[3]!.emitting).toBe(true)
    expect(JSON.stringify(tf)).toBe(before)
  })

  it('edits work on the editor\'s reactive (proxied) stack and keep an emptied field as NaN', () => {
    const tf = reactive(green())
    tf.layers[1]!.thicknessNm = NaN
    const dup = duplicateLayer(tf, 2)
    expect(dup.layers).toHaveLength(5)
    expect(Number.isNaN(cloneStack(tf).layers[1]!.thicknessNm)).toBe(true)
    expect(moveLayer(tf, 1, 1).layers[2]!.name).toBe('HTL')
    // the copy shares nothing with the original
    const c = cloneStack(tf)
    c.layers[0]!.material.n = 2.2
    c.cathode.material.k = 1
    expect(tf.layers[0]!.material.n).toBe(1.9)
    expect(tf.cathode.material.k).toBe(6.69)
  })

  it('setEmitting leaves exactly one emitting layer; updateLayer sets n, k and thickness', () => {
    const tf = setEmitting(duplicateLayer(green(), 2), 1)
    expect(tf.layers.map((l) => !!l.emitting)).toEqual([false, true, false, false, false])
    const u = updateLayer(tf, 0, { thicknessNm: 150, n: 2.0, k: 0.02 })
    expect(u.layers[0]).toMatchObject({ thicknessNm: 150, material: { n: 2, k: 0.02 } })
    expect(stackEmitterIndex(u)).toBe(1.75)
    expect(stackEmitterIndex(duplicateLayer(green(), 2))).toBeUndefined()
  })
})

describe('validation with thinFilmSchema, by field', () => {
  it('the reference stack is valid', () => {
    expect(checkStack(green())).toEqual({ ok: true, byPath: {}, all: [] })
  })

  it('two emitting layers: the message sits at the second one, numbered and named as the table shows them', () => {
    const c = checkStack(duplicateLayer(green(), 2))
    expect(c.ok).toBe(false)
    // rows counted from the glass, 1 first, as the table shows them (never the 0-based "layers 2 and 3")
    expect(c.byPath['layers.3.emitting']).toMatch(/^(Two|2) emitting layers \(layers? 3\b.*\b4\b.*\): mark exactly one layer as emitting$/)
    expect(c.byPath['layers.3.emitting']).not.toMatch(/layers 2 and 3/)
    expect(c.all).toEqual([`Layer 4 (EML copy): ${c.byPath['layers.3.emitting']}`])
  })

  it('the emitter position outside its layer is named at the position field, with the layer\'s range', () => {
    const c = checkStack({ ...green(), emitterPositionNm: 30 })
    expect(c.byPath.emitterPositionNm).toBe('The emitter position 30 nm is outside the emitting layer EML (thickness 20 nm): use 0 to 20 nm from its glass-side boundary')
  })

  it('no emitting layer, a negative k, a layer thicker than 10 µm, an emptied field: each at its own field', () => {
    const none = removeLayer(green(), 2)
    expect(checkStack(none).byPath.layers).toMatch(/^No emitting layer/)
    expect(checkStack(updateLayer(green(), 0, { k: -0.1 })).byPath['layers.0.material.k']).toBe('Extinction coefficient k must not be negative (a negative k would be optical gain)')
    expect(checkStack(updateLayer(green(), 3, { thicknessNm: 12_000 })).byPath['layers.3.thicknessNm']).toBe('Thickness must be at most 10000 nm (10 µm): a thicker layer is not a coherent thin film')
    const emptied = checkStack(updateLayer(green(), 1, { thicknessNm: NaN }))
    expect(emptied.byPath['layers.1.thicknessNm']).toBe('Thickness must be a number')
    expect(emptied.all).toEqual(['Layer 2 (HTL): Thickness must be a number'])
    expect(checkStack({ ...green(), horizontalDipoleFraction: 1.2 }).byPath.horizontalDipoleFraction).toBe('Horizontal dipole fraction must be between 0 and 1')
  })

  it('more than 30 layers is refused at the table', () => {
    let tf = green()
    while (tf.layers.length <= 30) tf = addLayer(tf)
    expect(checkStack(tf).byPath.layers).toBe('At most 30 layers between the glass and the cathode')
  })
})

describe('sweep axes from the stack', () => {
  it('one thickness axis per layer, named by the layer, in the path form emitter.thinFilm.layers[i].thicknessNm', () => {
    const opts = stackAxisOptions(green())
    expect(opts.slice(0, 4)).toEqual([
      { parameter: 'emitter.thinFilm.layers[0].thicknessNm', label: 'ITO thickness', unit: 'nm' },
      { parameter: 'emitter.thinFilm.layers[1].thicknessNm', label: 'HTL thickness', unit: 'nm' },
      { parameter: 'emitter.thinFilm.layers[2].thicknessNm', label: 'EML thickness', unit: 'nm' },
      { parameter: 'emitter.thinFilm.layers[3].thicknessNm', label: 'ETL thickness', unit: 'nm' },
    ])
    expect(stackAxisLabel('emitter.thinFilm.layers[3].thicknessNm', green())).toEqual({ label: 'ETL thickness', unit: 'nm' })
    expect(stackAxisLabel('emitter.thinFilm.layers[7].thicknessNm', null)).toEqual({ label: 'Layer 8 thickness', unit: 'nm' })
    expect(stackAxisLabel('lensArray.sagUm', green())).toBeNull()
    expect(stackAxisOptions(null)).toEqual([])
  })

  it('the default stack axis is the layer above the emitting one (the ETL of the reference stack)', () => {
    expect(defaultStackAxis(green())).toEqual({ parameter: 'emitter.thinFilm.layers[3].thicknessNm', start: 20, stop: 260, steps: 13 })
    // the span covers two cavity orders: successive maxima sit λ/(2n) apart in the layer (Fabry–Perot condition,
    // Hecht, Optics, ch. 9): 550/(2·1.75) ≈ 157 nm < 240 nm
  })
})
