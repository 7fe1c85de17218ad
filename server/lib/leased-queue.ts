import { Op, type Model, type ModelStatic, type WhereOptions } from 'sequelize';

/**
 * The claim of Ballast's delivery queues (mail_deliveries, webhook_deliveries): rows with a status,
 * attempts, next_attempt_at and lease_until. A due row (queued and due, or sending with a lease that ran
 * out because its worker died) is claimed by one conditional update that also counts the attempt; only the
 * caller whose update changed the row owns it.
 */
export async function claimDue<M extends Model>(
  model: ModelStatic<M>,
  options: { now: Date; leaseMs: number; limit: number },
): Promise<number[]> {
  const { now } = options;
  const due = {
    [Op.or]: [
      { status: 'queued', nextAttemptAt: { [Op.lte]: now } },
      { status: 'sending', leaseUntil: { [Op.lt]: now } },
    ],
  } as unknown as WhereOptions<M>;
  const candidates = (await model.findAll({
    where: due,
    attributes: ['id'],
    order: [['id', 'ASC']],
    limit: options.limit,
  })) as unknown as { id: number }[];
  const claimed: number[] = [];
  for (const candidate of candidates) {
    const [changed] = await model.update(
      {
        status: 'sending',
        leaseUntil: new Date(now.getTime() + options.leaseMs),
        attempts: model.sequelize!.literal('attempts + 1'),
      } as never,
      { where: { [Op.and]: [{ id: candidate.id }, due] } as unknown as WhereOptions<M> },
    );
    if (changed === 1) claimed.push(candidate.id);
  }
  return claimed;
}
