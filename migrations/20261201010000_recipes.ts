import type { Knex } from 'knex'

// The catalogue of string constructions under test.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('recipes', (t) => {
    t.increments('id')
    t.string('name', 120).notNullable()
    t.string('instrument', 20).notNullable()
    t.string('string_name', 4).notNullable()
    t.string('core', 40).notNullable()
    // Ordered list of { material, profile, wireMm }, innermost first.
    t.text('windings').notNullable().defaultTo('[]')
    t.string('damping_kind', 20).notNullable().defaultTo('none')
    t.string('damping_grade', 60).notNullable().defaultTo('')
    t.text('damping_notes').notNullable().defaultTo('')
    t.float('gauge_mm')
    t.float('tension_n')
    t.float('vibrating_length_mm').notNullable()
    t.integer('version').notNullable().defaultTo(1)
    t.integer('parent_id').references('recipes.id').onDelete('SET NULL')
    t.string('status', 20).notNullable().defaultTo('draft')
    t.text('notes').notNullable().defaultTo('')
    t.integer('created_by').references('users.id').onDelete('SET NULL')
    t.string('created_at', 30).notNullable()
    t.string('updated_at', 30).notNullable()
    t.unique(['name', 'version'])
    t.index(['instrument', 'string_name'])
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('recipes')
}
