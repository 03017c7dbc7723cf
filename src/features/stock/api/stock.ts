import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { AdjustLotInput, EmergencyKit, LotView, ReceiveLotInput, StockMovementView, StockProduct, UsageReport } from '../types';

export const stockKeys = {
  all: ['stock'] as const,
  lists: () => [...stockKeys.all, 'list'] as const,
  list: (all: boolean) => [...stockKeys.lists(), { all }] as const,
  lot: (id: string) => [...stockKeys.all, 'lot', id] as const,
  alerts: (date: string | undefined) => [...stockKeys.all, 'alerts', date ?? 'today'] as const,
  kit: () => [...stockKeys.all, 'emergency-kit'] as const,
  usage: (from: string, to: string) => [...stockKeys.all, 'usage', { from, to }] as const,
  products: () => [...stockKeys.all, 'products'] as const,
};

export const getStock = (all: boolean, signal?: AbortSignal) => api<{ date: string; lots: LotView[] }>('/api/stock', { query: { all: all ? '1' : undefined }, signal });
export const getStockLot = (id: string, signal?: AbortSignal) => api<LotView & { movements: StockMovementView[] }>(`/api/stock/lots/${id}`, { signal });
export const getStockAlerts = (date: string | undefined, signal?: AbortSignal) =>
  api<{ date: string; warnDays: number; expired: LotView[]; expiringSoon: LotView[] }>('/api/stock/alerts', { query: { date }, signal });
export const getEmergencyKit = (signal?: AbortSignal) => api<EmergencyKit>('/api/stock/emergency-kit', { signal });
export const getUsage = (from: string, to: string, signal?: AbortSignal) => api<UsageReport>('/api/stock/usage', { query: { from, to }, signal });
/** The catalogue as the shelf needs it (to match a scanned GTIN); read through the products API. */
export const getStockProducts = (signal?: AbortSignal) => api<StockProduct[]>('/api/products', { signal });
export const receiveLot = (input: ReceiveLotInput) => api<LotView>('/api/stock/lots', { method: 'POST', body: input });
export const adjustLot = (id: string, input: AdjustLotInput) => api<LotView>(`/api/stock/lots/${id}/adjust`, { method: 'POST', body: input });

export const stockQuery = (all: boolean) => queryOptions({ queryKey: stockKeys.list(all), queryFn: ({ signal }) => getStock(all, signal) });
export const stockLotQuery = (id: string) => queryOptions({ queryKey: stockKeys.lot(id), queryFn: ({ signal }) => getStockLot(id, signal) });
export const stockAlertsQuery = (date?: string) => queryOptions({ queryKey: stockKeys.alerts(date), queryFn: ({ signal }) => getStockAlerts(date, signal), refetchInterval: 5 * 60_000 });
export const emergencyKitQuery = () => queryOptions({ queryKey: stockKeys.kit(), queryFn: ({ signal }) => getEmergencyKit(signal), staleTime: 60_000 });
export const usageQuery = (from: string, to: string) => queryOptions({ queryKey: stockKeys.usage(from, to), queryFn: ({ signal }) => getUsage(from, to, signal) });
export const stockProductsQuery = () => queryOptions({ queryKey: stockKeys.products(), queryFn: ({ signal }) => getStockProducts(signal), staleTime: 60_000 });

export const useStock = (all: boolean) => useQuery(stockQuery(all));
export const useStockLot = (id: string | null) => useQuery({ ...stockLotQuery(id ?? ''), enabled: !!id });
export const useStockAlerts = (date?: string) => useQuery(stockAlertsQuery(date));
export const useEmergencyKit = () => useQuery(emergencyKitQuery());
export const useUsage = (from: string, to: string) => useQuery(usageQuery(from, to));
export const useStockProducts = () => useQuery(stockProductsQuery());

export function useReceiveLot() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: receiveLot, onSuccess: () => qc.invalidateQueries({ queryKey: stockKeys.all }) });
}

export function useAdjustLot() {
  const qc = useQueryClient();
  return useMutation({ mutationFn: ({ id, ...input }: AdjustLotInput & { id: string }) => adjustLot(id, input), onSuccess: () => qc.invalidateQueries({ queryKey: stockKeys.all }) });
}
